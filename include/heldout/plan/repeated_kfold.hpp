// heldout/plan/repeated_kfold.hpp — repeated k-fold cross-validation: R independent k-fold
// partitions (plain, stratified, grouped, or both).
//
//   auto r = heldout::repeated_kfold{.folds = 10, .repeats = 5, .seed = 7}.splits(heldout::strata(y));
//   for (const heldout::split& s : r) { /* s.repeat = 0..4, s.fold = 0..9, s.index = 10 * repeat + fold */ }
//
// Repeat r is exactly the k-fold assignment of heldout/plan/kfold.hpp drawn from
// heldout::rng(seed, r): repeated_kfold{k, 1, s} gives the same splits as kfold{k, s}, and
// repeat r is independent of how many repeats are asked for. Splits come repeat by repeat,
// folds in order (index = repeat * folds + fold). Bad input as for kfold, plus repeats = 0.
#pragma once

#include <heldout/plan/kfold.hpp>

HELDOUT_NAMESPACE_BEGIN

/// Repeated k-fold: repeats x folds splits; in each repeat every row is tested once.
struct repeated_kfold {
    std::size_t folds = 10;
    std::size_t repeats = 10;
    std::uint64_t seed = 0;

    using range = split_range<detail::kfold_engine>;
    static constexpr std::string_view name = "heldout::repeated_kfold";

    range splits(std::size_t n) const { return range({name, n, folds, repeats, seed, std::nullopt, std::nullopt}); }
    range splits(strata s) const { return range({name, s.rows(), folds, repeats, seed, std::move(s), std::nullopt}); }
    range splits(groups g) const { return range({name, g.rows(), folds, repeats, seed, std::nullopt, std::move(g)}); }
    /// Stratified and grouped, best effort (see kfold.hpp).
    range splits(strata s, groups g) const {
        return range({name, s.rows(), folds, repeats, seed, std::move(s), std::move(g)});
    }
};

HELDOUT_NAMESPACE_END
