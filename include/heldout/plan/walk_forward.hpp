// heldout/plan/walk_forward.hpp — rolling-origin evaluation for time-ordered rows: train
// on the past, test on the next `horizon` rows, move the origin by `step`.
//
//   // rows 0..n-1 in time order
//   heldout::walk_forward{.initial = 100, .horizon = 10, .step = 10}.splits(n);        // expanding window
//   heldout::walk_forward{.initial = 100, .horizon = 1, .gap = 5, .window = 100}.splits(n); // sliding, 5-row gap
//
// Tashman LJ (2000) Int. J. Forecasting 16:437-450 (rolling origin). Origins o_j = initial +
// j * step, j = 0, 1, ...; split j trains on [0, o_j) (window = 0, expanding) or on
// [o_j - window, o_j) (window > 0, sliding, fixed length) and tests on
// [o_j + gap, o_j + gap + horizon): the gap rows between them are in neither. Only full
// horizons are used: floor((n - initial - gap - horizon) / step) + 1 splits. Every test
// row comes after every train row (checked in debug builds). s.repeat = 0, s.fold = j.
//
// Members are unsigned, so a negative gap cannot be written: walk_forward{.gap = -1} does
// not compile (narrowing in a braced initialiser), and a negative number assigned later
// (w.gap = -1 wraps to 2^64 - 1) is refused at run time as "negative (wrapped to unsigned)".
// Bad input (heldout::input_error naming the member): initial = 0, horizon = 0, step = 0,
// window > initial, initial + gap + horizon > n (named 'gap' when the gap alone is to blame,
// else 'horizon'). So every split has a training row (initial >= 1, window 0 or >= 1) and
// `horizon` test rows.
#pragma once

#include <heldout/plan/range.hpp>

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

inline void check_not_wrapped(std::string_view who, std::string_view arg, std::size_t v) {
    if (v > (static_cast<std::size_t>(-1) >> 1))
        fail(who, arg, "negative (wrapped to unsigned: " + std::to_string(v) + ")");
}

class walk_forward_engine {
public:
    walk_forward_engine(std::string_view who, std::size_t n, std::size_t initial, std::size_t horizon, std::size_t step,
                        std::size_t gap, std::size_t window)
        : who_(who), n_(n), initial_(initial), horizon_(horizon), step_(step), gap_(gap), window_(window) {
        check_plan_rows(who_, "n", n_);
        check_not_wrapped(who_, "initial", initial_);
        check_not_wrapped(who_, "horizon", horizon_);
        check_not_wrapped(who_, "step", step_);
        check_not_wrapped(who_, "gap", gap_);
        check_not_wrapped(who_, "window", window_);
        if (initial_ == 0)
            fail(who_, "initial", "the first training set needs at least 1 row");
        if (horizon_ == 0)
            fail(who_, "horizon", "must be at least 1");
        if (step_ == 0)
            fail(who_, "step", "must be at least 1");
        if (window_ > initial_)
            fail(who_, "window",
                 "sliding window of " + std::to_string(window_) + " rows is longer than the " +
                     std::to_string(initial_) + " initial rows");
        // Each term is below 2^63 (checked above), so the sums cannot wrap.
        if (gap_ > 0 && initial_ + horizon_ <= n_ && initial_ + gap_ + horizon_ > n_)
            fail(who_, "gap",
                 "leaves no test row: initial " + std::to_string(initial_) + " + gap " + std::to_string(gap_) +
                     " + horizon " + std::to_string(horizon_) + " exceeds the " + std::to_string(n_) + " rows");
        if (initial_ + gap_ + horizon_ > n_)
            fail(who_, "horizon",
                 "runs past the end: initial " + std::to_string(initial_) + " + gap " + std::to_string(gap_) +
                     " + horizon " + std::to_string(horizon_) + " exceeds the " + std::to_string(n_) + " rows");
        count_ = (n_ - initial_ - gap_ - horizon_) / step_ + 1;
    }

    std::string_view name() const noexcept { return who_; }
    split_design design() const noexcept { return split_design::time_ordered; }
    std::size_t size() const noexcept { return count_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return 1; }
    std::size_t folds() const noexcept { return count_; }
    bool partitions() const noexcept { return false; }
    std::size_t gap() const noexcept { return gap_; }

    void make(std::size_t j, workspace& w) const {
        const std::size_t origin = initial_ + j * step_;
        const std::size_t first = window_ == 0 ? 0 : origin - window_;
        w.size_buffers(origin - first, horizon_);
        for (std::size_t r = first; r < origin; ++r)
            w.train[r - first] = r;
        for (std::size_t h = 0; h < horizon_; ++h)
            w.test[h] = origin + gap_ + h;
        w.repeat = 0;
        w.fold = j;
        w.has_counts = false;
    }

    void check(const split& s, workspace&) const { check_split_time_order(who_, s, gap_); }

private:
    std::string_view who_;
    std::size_t n_, initial_, horizon_, step_, gap_, window_, count_ = 0;
};

} // namespace detail

/// Rolling-origin (walk-forward) evaluation of time-ordered rows.
struct walk_forward {
    std::size_t initial = 0; ///< training rows before the first origin
    std::size_t horizon = 1; ///< test rows per split
    std::size_t step = 1;    ///< rows between successive origins
    std::size_t gap = 0;     ///< rows skipped between train and test
    std::size_t window = 0;  ///< 0: expanding window; else the fixed training length

    using range = split_range<detail::walk_forward_engine>;
    static constexpr std::string_view name = "heldout::walk_forward";

    range splits(std::size_t n) const { return range({name, n, initial, horizon, step, gap, window}); }
};

HELDOUT_NAMESPACE_END
