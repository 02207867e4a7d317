// heldout/plan/purged_kfold.hpp — k-fold for rows whose labels span time: contiguous test
// blocks, training rows whose label interval overlaps the test span purged, optional embargo.
//
//   // label of row i uses times [t0[i], t1[i]] (e.g. a forward return from t0 to t1)
//   auto iv = heldout::intervals(t0, t1);
//   for (const heldout::split& s : heldout::purged_kfold{.folds = 5, .embargo = 2}.splits(iv)) { ... }
//
// López de Prado M (2018) Advances in Financial Machine Learning, Wiley, Ch. 7.
// Rows are in time order (t0 non-decreasing, checked by heldout::intervals). Fold f is the
// contiguous block of rows [b_f, b_{f+1}) with the first n mod k folds one row longer (no
// shuffling, no seed). Its test span is [min t0, max t1] over the block (the hull: a gap
// inside it is purged too).
// Embargo convention (ours, stated as the source asks): the embargo is in the units of t0/t1
// and extends the span's end, to [min t0, max t1 + embargo], before purging; a training row
// i is purged when its closed interval [t0_i, t1_i] meets that span. So rows just after the
// test block whose labels start within `embargo` time of its end are dropped as well. With
// integer times the embargo must be a whole number. Training rows after the test block are
// used (allowed with purging and embargo, though not in a strict forecasting protocol; use
// heldout::walk_forward for that). s.repeat = 0, s.fold = f.
// Bad input: folds < 2, folds > n, negative or non-finite embargo, and a plan that leaves some
// split with no training row (every other row purged): refused when the range is built, naming
// the first such split, as argument 'embargo' when the purge alone would have kept a row, else
// as argument 'intervals' (the label intervals are too long for this many folds).
#pragma once

#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// Train rows overlapping the (embargo-extended) test span; the check behind purging.
template <class T>
void check_split_purged(std::string_view who, const split& s, const intervals<T>& iv, T embargo) {
    if (s.test.empty())
        return;
    const auto t0 = iv.t0();
    const auto t1 = iv.t1();
    T lo = t0[s.test[0]], hi = t1[s.test[0]];
    for (std::size_t r : s.test) {
        lo = t0[r] < lo ? t0[r] : lo;
        hi = t1[r] > hi ? t1[r] : hi;
    }
    hi = static_cast<T>(hi + embargo);
    for (std::size_t j = 0; j < s.train.size(); ++j) {
        const std::size_t r = s.train[j];
        if (t0[r] <= hi && t1[r] >= lo)
            fail_at(who, "split", split_label(s) + ": train row " + std::to_string(r) + " overlaps the test label span",
                    j);
    }
}

template <class T>
class purged_kfold_engine {
public:
    purged_kfold_engine(std::string_view who, std::size_t k, double embargo, intervals<T> iv)
        : who_(who), n_(iv.rows()), k_(k), iv_(std::move(iv)) {
        if (k_ < 2)
            fail(who_, "folds", "must be at least 2, got " + std::to_string(k_));
        if (k_ > n_)
            fail(who_, "folds", std::to_string(k_) + " folds exceed the " + std::to_string(n_) + " rows");
        if (!std::isfinite(embargo) || embargo < 0)
            fail(who_, "embargo", "must be finite and non-negative, got " + number_text(embargo));
        if constexpr (std::is_integral_v<T>) {
            if (embargo != std::floor(embargo))
                fail(who_, "embargo", "must be a whole number with integer times, got " + number_text(embargo));
        }
        embargo_ = static_cast<T>(embargo);
        check_every_split_trains(embargo);
    }

    std::string_view name() const noexcept { return who_; }
    split_design design() const noexcept { return split_design::purged; }
    std::size_t size() const noexcept { return k_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return 1; }
    std::size_t folds() const noexcept { return k_; }
    bool partitions() const noexcept { return true; }

    /// First row of fold f (f = k gives n).
    std::size_t block_start(std::size_t f) const noexcept {
        const std::size_t base = n_ / k_, extra = n_ % k_;
        return f * base + (f < extra ? f : extra);
    }

    void make(std::size_t f, workspace& w) const {
        const std::size_t b = block_start(f), e = block_start(f + 1);
        const auto t0 = iv_.t0();
        const auto t1 = iv_.t1();
        const T lo = t0[b], hi = span_end(f, embargo_);
        w.size_buffers(n_ - (e - b), e - b);
        for (std::size_t r = b; r < e; ++r)
            w.test[r - b] = r;
        std::size_t a = 0;
        for (std::size_t r = 0; r < n_; ++r) {
            if (r == b) {
                r = e - 1;
                continue;
            }
            w.train[a] = r;
            a += !(t0[r] <= hi && t1[r] >= lo);
        }
        HELDOUT_ASSERT(a > 0); // refused at construction otherwise
        w.train_size = a;
        w.repeat = 0;
        w.fold = f;
        w.has_counts = false;
    }

    void check(const split& s, workspace&) const { check_split_purged(who_, s, iv_, embargo_); }

    /// Largest t1 over fold f's block, plus e (the end of its test span extended by e).
    T span_end(std::size_t f, T e) const noexcept {
        const auto t1 = iv_.t1();
        T hi = t1[block_start(f)];
        for (std::size_t r = block_start(f); r < block_start(f + 1); ++r)
            hi = t1[r] > hi ? t1[r] : hi;
        return static_cast<T>(hi + e);
    }

    const intervals<T>& intervals_data() const noexcept { return iv_; }
    T embargo() const noexcept { return embargo_; }

private:
    /// Refuses a plan in which purging leaves some split without a training row, before any
    /// split is built. O(n): rows are in time order, so with lo = t0[b] (the block's first
    /// start) a row before the block survives iff t1 < lo, and a row after it iff t0 > the
    /// span's end, which the last row decides.
    void check_every_split_trains(double embargo) const {
        const auto t0 = iv_.t0();
        const auto t1 = iv_.t1();
        T min_t1_before = t1[0]; // min of t1 over rows 0..b-1 (valid for b > 0)
        for (std::size_t f = 0; f < k_; ++f) {
            const std::size_t b = block_start(f), e = block_start(f + 1);
            for (std::size_t r = f == 0 ? 0 : block_start(f - 1); r < b; ++r)
                min_t1_before = t1[r] < min_t1_before ? t1[r] : min_t1_before;
            const T lo = t0[b];
            const bool before = b > 0 && min_t1_before < lo;
            const bool after = e < n_ && t0[n_ - 1] > span_end(f, embargo_);
            if (before || after)
                continue;
            // The embargo is to blame when the purge alone would have kept a row.
            const bool embargo_empties = e < n_ && t0[n_ - 1] > span_end(f, T{});
            fail(who_, embargo_empties ? "embargo" : "intervals",
                 "with folds = " + std::to_string(k_) + ", embargo = " + number_text(embargo) + " leaves split " +
                     std::to_string(f) +
                     " with no training row: the label interval of every row outside its test "
                     "rows " +
                     std::to_string(b) + ".." + std::to_string(e - 1) + " meets the test span [" +
                     number_text(static_cast<double>(lo)) + ", " +
                     number_text(static_cast<double>(span_end(f, embargo_))) + "]" +
                     (embargo_empties ? "; use a smaller embargo" : "; use more folds or shorter label intervals"));
        }
    }

    std::string_view who_;
    std::size_t n_, k_;
    intervals<T> iv_;
    T embargo_{};
};

} // namespace detail

/// Purged k-fold with embargo, for labels spanning time intervals.
struct purged_kfold {
    std::size_t folds = 5;
    double embargo = 0; ///< in the units of t0/t1; extends each test span's end

    template <class T>
    using range = split_range<detail::purged_kfold_engine<T>>;
    static constexpr std::string_view name = "heldout::purged_kfold";

    template <class T>
    range<T> splits(intervals<T> iv) const {
        return range<T>(detail::purged_kfold_engine<T>(name, folds, embargo, std::move(iv)));
    }
};

HELDOUT_NAMESPACE_END
