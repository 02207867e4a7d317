// heldout/core/split.hpp — one train/test split: the unit every plan produces and every
// aggregator consumes.
//
//   for (const heldout::split& s : heldout::kfold{.folds = 5, .seed = 1}.splits(n)) {
//       fit(s.train);                // std::span<const std::size_t>: row numbers
//       score(s.test);
//       // s.repeat, s.fold, s.index; s.counts for bootstrap plans
//   }
//
// The spans point into buffers owned by the split range and stay valid until the range
// produces its next split (to_vector() / keep() copies when a split must outlive that).
#pragma once

#include <heldout/core/config.hpp>

#include <cstddef>
#include <cstdint>
#include <span>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// How a plan draws its splits; the interval methods that apply depend on it
/// (estimate/methods.hpp).
enum class split_design : unsigned char {
    random,        ///< random train/test splits without replacement: holdout, k-fold, repeated
                   ///< k-fold, subsampling, 5x2 (stratified or grouped alike); also the
                   ///< default for hand-made splits
    leave_one_out, ///< every row its own test set
    time_ordered,  ///< test rows after the training rows in time (walk_forward)
    purged,        ///< contiguous blocks with training rows near the test block removed (purged_kfold)
    bootstrap      ///< bootstrap samples, out-of-bag rows as the test set
};

constexpr std::string_view to_string(split_design d) noexcept {
    switch (d) {
    case split_design::random:
        return "random splits";
    case split_design::leave_one_out:
        return "leave-one-out";
    case split_design::time_ordered:
        return "time-ordered splits";
    case split_design::purged:
        return "purged k-fold";
    case split_design::bootstrap:
        return "bootstrap samples";
    }
    return "?";
}

/// A train/test split of rows 0..n-1.
struct split {
    std::span<const std::size_t> train;         ///< rows to fit on (a bootstrap sample keeps duplicates)
    std::span<const std::size_t> test;          ///< rows to score, ascending
    std::size_t repeat = 0;                     ///< repetition number (0-based)
    std::size_t fold = 0;                       ///< fold within the repetition (0-based)
    std::size_t index = 0;                      ///< position of this split in its plan (0-based)
    std::span<const std::uint32_t> counts{};    ///< bootstrap only: counts[r] = times row r was drawn (size n)
    split_design design = split_design::random; ///< how the plan drew it (bootstrap when counts are given)
};

/// A split that owns its rows (for keeping one beyond the range's next step).
struct owned_split {
    std::vector<std::size_t> train;
    std::vector<std::size_t> test;
    std::size_t repeat = 0;
    std::size_t fold = 0;
    std::size_t index = 0;
    std::vector<std::uint32_t> counts;
    split_design design = split_design::random;

    owned_split() = default;
    explicit owned_split(const split& s)
        : train(s.train.begin(), s.train.end()), test(s.test.begin(), s.test.end()), repeat(s.repeat), fold(s.fold),
          index(s.index), counts(s.counts.begin(), s.counts.end()), design(s.design) {}

    /// A non-owning view of this split.
    split view() const noexcept { return {train, test, repeat, fold, index, counts, design}; }
};

HELDOUT_NAMESPACE_END
