// heldout/measure/r_squared.hpp — the coefficient of determination on a test set.
//
//   double r2 = heldout::evaluate(heldout::measure::r_squared{}, y, f);       // 1 - SSE / SST
//   double rw = heldout::evaluate(heldout::measure::r_squared{}, y, f, wts);  // weighted
//
// R^2 = 1 - SSE/SST with SSE = sum w (y - f)^2 and SST = sum w (y - ybar)^2, ybar the
// weighted mean of the *test set's own* truth. So R^2 can be negative (worse than
// predicting the test mean) and is at most 1. Undefined (undefined_error) when SST = 0,
// i.e. the truth is constant over the rows of positive weight — detected exactly through
// the minimum and maximum, not through a rounded SST — and with no rows or zero weight.
// State: weight, mean and centred sum of squares merged by Chan, Golub & LeVeque (1979,
// "Updating formulae and a pairwise algorithm for computing sample variances"); each
// batch is centred in two passes with compensated sums; SSE is a compensated sum.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Running state of r_squared.
struct r_squared;

class r_squared_accumulator {
public:
    /// The measure this state belongs to.
    r_squared measure() const;

    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        auto [t, p] = views(truth, prediction);
        add_batch(t, p, [](std::size_t) { return 1.0; });
    }
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        auto [t, p] = views(truth, prediction);
        detail::check_same_size(who(), "weights", t.size(), w.size());
        detail::check_weights(who(), w);
        add_batch(t, p, [&](std::size_t i) { return static_cast<double>(w[i]); });
    }
    void add_one(double y, double f, double w = 1.0) {
        detail::check_finite_at(who(), "truth", y, 0);
        detail::check_finite_at(who(), "prediction", f, 0);
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        ++count_;
        if (!(w > 0))
            return;
        // West (1979) weighted update.
        const double wn = weight_ + w;
        const double d = y - mean_;
        mean_ += (w / wn) * d;
        m2_ += w * d * (y - mean_);
        weight_ = wn;
        sse_.add(w * (y - f) * (y - f));
        ymin_ = y < ymin_ ? y : ymin_;
        ymax_ = y > ymax_ ? y : ymax_;
    }
    void merge(const r_squared_accumulator& o) {
        count_ += o.count_;
        combine(o.weight_, o.mean_, o.m2_, o.sse_, o.ymin_, o.ymax_);
    }
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        if (!(weight_ > 0))
            detail::fail_undefined(who(), "total weight is zero");
        if (!(ymin_ < ymax_))
            detail::fail_undefined(who(), "truth is constant (total sum of squares is zero)");
        return 1.0 - sse_.value() / m2_;
    }
    void reset() noexcept {
        count_ = 0;
        weight_ = mean_ = m2_ = 0;
        sse_.reset();
        ymin_ = std::numeric_limits<double>::infinity();
        ymax_ = -std::numeric_limits<double>::infinity();
    }

    template <class F>
    void visit_state(F&& f) {
        f(count_);
        f(weight_);
        f(mean_);
        f(m2_);
        sse_.visit_state(f);
        f(ymin_);
        f(ymax_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(count_);
        f(weight_);
        f(mean_);
        f(m2_);
        sse_.visit_state(f);
        f(ymin_);
        f(ymax_);
    }

private:
    static std::string_view who() { return "measure R-squared"; }

    template <class T, class P>
    static auto views(const T& truth, const P& prediction) {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        detail::check_finite(who(), "truth", t);
        detail::check_finite(who(), "prediction", p);
        return std::pair{t, p};
    }

    template <class T, class P, class Wf>
    void add_batch(std::span<const T> t, std::span<const P> p, Wf weight) {
        detail::compensated_sum w, wy, c, m2, sse;
        double lo = std::numeric_limits<double>::infinity(), hi = -lo;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = weight(i), y = static_cast<double>(t[i]);
            w.add(wi);
            wy.add(wi * y);
            if (wi > 0) {
                lo = y < lo ? y : lo;
                hi = y > hi ? y : hi;
            }
        }
        const double wb = w.value();
        const double mean = wb > 0 ? wy.value() / wb : 0.0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = weight(i), y = static_cast<double>(t[i]), e = y - static_cast<double>(p[i]);
            const double d = y - mean;
            c.add(wi * d);
            m2.add(wi * d * d);
            sse.add(wi * e * e);
        }
        if (!std::isfinite(sse.value()) || !std::isfinite(m2.value()))
            detail::fail(who(), "prediction", "arithmetic overflow (values too large for double)");
        // Corrected two-pass centring: subtract the rounding left in the mean.
        const double m2b = wb > 0 ? m2.value() - c.value() * c.value() / wb : 0.0;
        count_ += t.size();
        combine(wb, mean, m2b, sse, lo, hi);
    }

    void combine(double wb, double meanb, double m2b, const detail::compensated_sum& sseb, double lo, double hi) {
        sse_.merge(sseb);
        ymin_ = lo < ymin_ ? lo : ymin_;
        ymax_ = hi > ymax_ ? hi : ymax_;
        if (!(wb > 0))
            return;
        if (!(weight_ > 0)) {
            weight_ = wb;
            mean_ = meanb;
            m2_ = m2b;
            return;
        }
        const double wn = weight_ + wb;
        const double d = meanb - mean_;
        mean_ += d * (wb / wn);
        m2_ += m2b + d * d * (weight_ * wb / wn);
        weight_ = wn;
    }

    std::uint64_t count_ = 0;
    double weight_ = 0, mean_ = 0, m2_ = 0;
    detail::compensated_sum sse_{};
    double ymin_ = std::numeric_limits<double>::infinity();
    double ymax_ = -std::numeric_limits<double>::infinity();
};

/// R^2 = 1 - SSE/SST on the test set (its own mean); higher is better.
struct r_squared {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::real;

    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "r_squared";
    std::string name() const { return "R-squared"; }
    r_squared_accumulator accumulator() const { return {}; }
};

inline r_squared r_squared_accumulator::measure() const { return {}; }

} // namespace measure
HELDOUT_NAMESPACE_END
