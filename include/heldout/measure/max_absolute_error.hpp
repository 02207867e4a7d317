// heldout/measure/max_absolute_error.hpp — the largest absolute error, max |y_i - f_i|.
//
//   double m = heldout::evaluate(heldout::measure::max_absolute_error{}, y, f);
//   double w = heldout::evaluate(heldout::measure::max_absolute_error{}, y, f, wts);
//
// Weights select rather than scale: the maximum is over the rows of positive weight
// (a weight of 0 removes a row; any positive weight keeps it), so integer weights mean
// replication as everywhere else. Undefined (undefined_error) with no row of positive
// weight. Streaming and mergeable (max of maxima), exact.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/validate.hpp>

#include <cmath>
#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Running state of max_absolute_error: the maximum so far and the row counts.
struct max_absolute_error;

class max_absolute_error_accumulator {
public:
    /// The measure this state belongs to.
    max_absolute_error measure() const;

    /// Adds a batch of real truth and floating-point predictions.
    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        auto [t, p] = views(truth, prediction);
        double m = -1.0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double e = std::fabs(static_cast<double>(t[i]) - static_cast<double>(p[i]));
            m = e > m ? e : m;
        }
        finish(t, p, m, t.size(), t.size());
    }
    /// Adds a weighted batch: rows of weight 0 are left out.
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto [t, p] = views(truth, prediction);
        auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", t.size(), w.size());
        detail::check_weights(who(), w);
        double m = -1.0;
        std::uint64_t kept = 0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double e = std::fabs(static_cast<double>(t[i]) - static_cast<double>(p[i]));
            const bool in = w[i] > 0;
            kept += in;
            m = (in && e > m) ? e : m;
        }
        finish(t, p, m, t.size(), kept);
    }
    void add_one(double y, double f, double w = 1.0) {
        detail::check_finite_at(who(), "truth", y, 0);
        detail::check_finite_at(who(), "prediction", f, 0);
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        ++count_;
        if (w > 0) {
            ++positive_;
            const double e = std::fabs(y - f);
            max_ = e > max_ ? e : max_;
        }
    }
    void merge(const max_absolute_error_accumulator& o) {
        max_ = o.max_ > max_ ? o.max_ : max_;
        count_ += o.count_;
        positive_ += o.positive_;
    }
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        if (positive_ == 0)
            detail::fail_undefined(who(), "total weight is zero");
        return max_;
    }
    void reset() noexcept {
        max_ = 0;
        count_ = positive_ = 0;
    }

    template <class F>
    void visit_state(F&& f) {
        f(max_);
        f(count_);
        f(positive_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(max_);
        f(count_);
        f(positive_);
    }

    /// After a load (stream/serialize.hpp): the maximum finite and >= 0 (0 with no row of
    /// positive weight), rows of positive weight at most the rows.
    void check_state() const {
        detail::check_loaded_nonnegative("max", max_);
        if (positive_ > count_)
            detail::fail_loaded("positive", "more rows of positive weight than rows");
        if (positive_ == 0 && max_ != 0)
            detail::fail_loaded("max", "is not 0 with no row of positive weight");
    }

private:
    static std::string_view who() { return "measure max absolute error"; }

    template <class T, class P>
    static auto views(const T& truth, const P& prediction) {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        return std::pair{t, p};
    }
    template <class T, class P>
    void finish(std::span<const T> t, std::span<const P> p, double m, std::size_t n, std::uint64_t kept) {
        // A NaN never wins a comparison, so inputs are checked explicitly (after the pass,
        // before the state changes).
        detail::check_finite(who(), "truth", t);
        detail::check_finite(who(), "prediction", p);
        if (!std::isfinite(m))
            detail::fail(who(), "prediction", "arithmetic overflow (values too large for double)");
        if (kept > 0)
            max_ = m > max_ ? m : max_;
        count_ += n;
        positive_ += kept;
    }

    double max_ = 0.0;
    std::uint64_t count_ = 0;
    std::uint64_t positive_ = 0;
};

/// The maximum absolute error over the rows (of positive weight).
struct max_absolute_error {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::real;

    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "max_absolute_error";
    std::string name() const { return "max absolute error"; }
    max_absolute_error_accumulator accumulator() const { return {}; }
};

inline max_absolute_error max_absolute_error_accumulator::measure() const { return {}; }

} // namespace measure
HELDOUT_NAMESPACE_END
