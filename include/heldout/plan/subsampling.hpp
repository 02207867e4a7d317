// heldout/plan/subsampling.hpp — repeated random holdout (Monte-Carlo cross-validation):
// J independent train/test splits of the same sizes, the setting of the corrected
// resampled t test (Nadeau & Bengio 2003).
//
//   auto r = heldout::subsampling{.repeats = 50, .test_fraction = 0.1, .seed = 4}.splits(n);
//   for (const heldout::split& s : r) { /* s.repeat = 0..49, s.fold = 0 */ }
//
// Split j is exactly heldout::holdout{test_fraction, test_count, seed} drawn from
// heldout::rng(seed, j) (see holdout.hpp for the draw, the test size and strata/groups), so
// the first split equals the holdout with the same members. Rows may be tested in several
// splits or in none.
#pragma once

#include <heldout/plan/holdout.hpp>

HELDOUT_NAMESPACE_BEGIN

/// Repeated random holdout: `repeats` independent train/test splits.
struct subsampling {
    std::size_t repeats = 10;
    double test_fraction = 0.25;
    std::size_t test_count = 0; ///< when > 0, the test size in rows (test_fraction is then ignored)
    std::uint64_t seed = 0;

    using range = split_range<detail::holdout_engine>;
    static constexpr std::string_view name = "heldout::subsampling";

    range splits(std::size_t n) const {
        return range({name, n, repeats, test_fraction, test_count, seed, std::nullopt, std::nullopt});
    }
    range splits(strata s) const {
        return range({name, s.rows(), repeats, test_fraction, test_count, seed, std::move(s), std::nullopt});
    }
    range splits(groups g) const {
        return range({name, g.rows(), repeats, test_fraction, test_count, seed, std::nullopt, std::move(g)});
    }
};

HELDOUT_NAMESPACE_END
