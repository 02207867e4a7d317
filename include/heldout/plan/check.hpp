// heldout/plan/check.hpp — leakage guards: the checks plans run on every split in debug
// builds, exposed for splits from anywhere (a CSV written by another tool, a custom plan).
//
//   auto r = heldout::kfold{.folds = 5, .seed = 1}.splits(heldout::groups(patient));
//   heldout::check_splits(r);                         // every split: rows, order, disjointness
//   heldout::check_partition(r);                      // each row tested once per repeat
//   heldout::check_groups(r.split(0), heldout::groups(patient));
//   heldout::check_time_order(s, /*gap=*/5);          // every train row before every test row
//   heldout::check_purged(s, heldout::intervals(t0, t1), /*embargo=*/1.0);
//
// Each check throws heldout::input_error naming the check (or the `who` given), the
// argument 'split' and the offending split and row; it returns normally when all is well.
// check_disjoint allows repeated train rows only for splits that carry bootstrap counts.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/split.hpp>
#include <heldout/plan/purged_kfold.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Rows below n, test strictly ascending, train ascending, train and test disjoint (for a
/// split with bootstrap counts: counts match train and out-of-bag rows were never drawn).
inline void check_disjoint(const split& s, std::size_t n, std::string_view who = "heldout::check_disjoint") {
    std::vector<std::uint8_t> mark;
    detail::check_split_basic(who, s, n, mark);
}

/// No group has rows on both sides.
inline void check_groups(const split& s, const groups& g, std::string_view who = "heldout::check_groups") {
    std::vector<std::uint8_t> mark;
    for (std::size_t r : s.train)
        if (r >= g.rows())
            detail::fail(who, "split", "train row " + std::to_string(r) + " outside the groups' rows");
    for (std::size_t r : s.test)
        if (r >= g.rows())
            detail::fail(who, "split", "test row " + std::to_string(r) + " outside the groups' rows");
    detail::check_split_groups(who, s, g, mark);
}

/// Every train row comes before every test row, with at least `gap` rows between.
inline void check_time_order(const split& s, std::size_t gap = 0, std::string_view who = "heldout::check_time_order") {
    detail::check_split_time_order(who, s, gap);
}

/// No train row's label interval meets the test rows' span [min t0, max t1 + embargo].
template <class T>
void check_purged(const split& s, const intervals<T>& iv, double embargo = 0,
                  std::string_view who = "heldout::check_purged") {
    for (std::size_t r : s.train)
        if (r >= iv.rows())
            detail::fail(who, "split", "train row " + std::to_string(r) + " outside the intervals' rows");
    for (std::size_t r : s.test)
        if (r >= iv.rows())
            detail::fail(who, "split", "test row " + std::to_string(r) + " outside the intervals' rows");
    detail::check_split_purged(who, s, iv, static_cast<T>(embargo));
}

namespace detail {
template <class R>
void check_partition_of(R& r, std::size_t n, std::size_t folds, std::string_view who) {
    std::vector<std::uint32_t> tested(n, 0);
    const std::size_t total = r.size();
    for (std::size_t i = 0; i < total; ++i) {
        const split& s = r.split(i);
        for (std::size_t t : s.test) {
            if (t >= n)
                fail(who, "split",
                     split_label(s) + ": test row " + std::to_string(t) + " outside 0.." + std::to_string(n - 1));
            ++tested[t];
        }
        if ((i + 1) % folds == 0) { // end of a repeat
            for (std::size_t row = 0; row < n; ++row)
                if (tested[row] != 1)
                    fail(who, "split",
                         "repeat " + std::to_string(s.repeat) + ": row " + std::to_string(row) + " tested " +
                             std::to_string(tested[row]) + " times, not once");
            std::fill(tested.begin(), tested.end(), 0u);
        }
    }
}
} // namespace detail

/// Each repeat's test sets partition the rows: every row tested exactly once per repeat.
/// Splits are taken in order, r.folds() per repeat.
template <split_source R>
void check_partition(R&& r, std::string_view who = "heldout::check_partition") {
    detail::check_partition_of(r, r.rows(), r.folds(), who);
}

/// The same for kept splits: `folds` consecutive splits per repeat, rows 0..n-1.
inline void check_partition(const std::vector<owned_split>& v, std::size_t n, std::size_t folds,
                            std::string_view who = "heldout::check_partition") {
    struct view {
        const std::vector<owned_split>& v;
        heldout::split s;
        std::size_t size() const { return v.size(); }
        const heldout::split& split(std::size_t i) { return s = v[i].view(); }
    } w{v, {}};
    if (folds == 0 || v.size() % folds != 0)
        detail::fail(who, "folds",
                     std::to_string(v.size()) + " splits are not whole repeats of " + std::to_string(folds) + " folds");
    detail::check_partition_of(w, n, folds, who);
}

/// Every split of a range: check_disjoint, and check_partition when the plan promises it.
template <split_source R>
void check_splits(R&& r, std::string_view who = "heldout::check_splits") {
    std::vector<std::uint8_t> mark;
    const std::size_t total = r.size();
    for (std::size_t i = 0; i < total; ++i)
        detail::check_split_basic(who, r.split(i), r.rows(), mark);
    if constexpr (requires { r.partitions(); }) {
        if (r.partitions())
            check_partition(r, who);
    }
}

HELDOUT_NAMESPACE_END
