// heldout/plan/five_by_two.hpp — the splits of Dietterich's (1998) 5x2cv: five replications
// of 2-fold cross-validation, in the order the 5x2cv paired t test needs.
//
//   auto r = heldout::five_by_two{.seed = 3}.splits(n);     // 10 splits
//   std::vector<double> d;                                   // differences A - B, as run
//   for (const heldout::split& s : r) d.push_back(diff_on(s));
//   auto t = heldout::five_by_two_test(d);                   // heldout/compare/five_by_two.hpp
//
// Dietterich TG (1998) Neural Computation 10:1895-1923: in replication i the
// data are split at random into two halves S1 and S2; the algorithms are trained on S1 and
// tested on S2, then trained on S2 and tested on S1, giving p_i^(1) and p_i^(2).
// Here split index 2i + j is replication i (s.repeat = i), fold j (s.fold = j): index 2i is
// p_i^(1) (test = fold 0 of replication i) and 2i + 1 is p_i^(2) (train and test swapped).
// Only p_1^(1) (index 0) enters the t statistic's numerator, so keep this order.
// five_by_two{.seed = s} is exactly repeated_kfold{.folds = 2, .repeats = 5, .seed = s}
// (same engine, same draws; only the name in messages differs); strata and groups work as
// for kfold (stratified 2-fold keeps class shares within one row in each half).
#pragma once

#include <heldout/plan/kfold.hpp>

HELDOUT_NAMESPACE_BEGIN

/// 5x2cv: 5 replications of 2-fold cross-validation (10 splits).
struct five_by_two {
    std::uint64_t seed = 0;

    using range = split_range<detail::kfold_engine>;
    static constexpr std::string_view name = "heldout::five_by_two";
    static constexpr std::size_t replications = 5;

    range splits(std::size_t n) const { return range({name, n, 2, replications, seed, std::nullopt, std::nullopt}); }
    range splits(strata s) const { return range({name, s.rows(), 2, replications, seed, std::move(s), std::nullopt}); }
    range splits(groups g) const { return range({name, g.rows(), 2, replications, seed, std::nullopt, std::move(g)}); }
    range splits(strata s, groups g) const {
        return range({name, s.rows(), 2, replications, seed, std::move(s), std::move(g)});
    }
};

HELDOUT_NAMESPACE_END
