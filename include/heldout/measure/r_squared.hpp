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
// batch (add_one: a batch of one row) is centred in two passes with compensated sums; SSE
// is a compensated sum. The mean is kept as an unevaluated sum of two doubles, so merged
// shards equal the whole to about 1e-15 even when the truth has a large common offset
// (1e12 + noise); weights, SSE and the sum of squares are kept in units of a power of two
// taken from the largest weight, so any common scale of the weights gives the same value.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <utility>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

struct r_squared;

/// Running state of r_squared.
///
/// State (visit_state order): count, unit (the exponent e of the weight unit 2^e), weight
/// (sum of weights / 2^e), mean (as an unevaluated sum mean + mean_low), m2 (centred sum of
/// squares / 2^e), SSE (compensated, / 2^e), the smallest and largest truth of positive weight.
class r_squared_accumulator {
public:
    /// The measure this state belongs to.
    r_squared measure() const;

    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        auto [t, p] = views(truth, prediction);
        add_rows(
            t, p, [](std::size_t) { return 1.0; }, false);
    }
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        auto [t, p] = views(truth, prediction);
        detail::check_same_size(who(), "weights", t.size(), w.size());
        detail::check_weights(who(), w);
        add_rows(
            t, p, [&](std::size_t i) { return static_cast<double>(w[i]); }, true);
    }
    void add_one(double y, double f, double w = 1.0) {
        detail::check_finite_at(who(), "truth", y, 0);
        detail::check_finite_at(who(), "prediction", f, 0);
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        add_rows(
            std::span<const double>(&y, 1), std::span<const double>(&f, 1), [w](std::size_t) { return w; }, w != 1.0);
    }
    void merge(const r_squared_accumulator& o) {
        count_ += o.count_;
        combine(part{o.unit_, o.weight_, o.mean_, o.mean_low_, o.m2_, o.sse_, o.ymin_, o.ymax_});
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
        unit_ = 0;
        weight_ = mean_ = mean_low_ = m2_ = 0;
        sse_.reset();
        ymin_ = std::numeric_limits<double>::infinity();
        ymax_ = -std::numeric_limits<double>::infinity();
    }

    template <class F>
    void visit_state(F&& f) {
        f(count_);
        f(unit_);
        f(weight_);
        f(mean_);
        f(mean_low_);
        f(m2_);
        sse_.visit_state(f);
        f(ymin_);
        f(ymax_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(count_);
        f(unit_);
        f(weight_);
        f(mean_);
        f(mean_low_);
        f(m2_);
        sse_.visit_state(f);
        f(ymin_);
        f(ymax_);
    }

    /// After a load (stream/serialize.hpp): weight, m2 and SSE finite and >= 0, the mean
    /// finite, the unit a binary exponent a weight can have, and the truth range either empty
    /// (+inf, -inf: no row of positive weight) or finite with min <= max.
    void check_state() const {
        if (unit_ < -1100 || unit_ > 1100)
            detail::fail_loaded("unit", "exponent " + std::to_string(unit_) + " outside the range of a double");
        detail::check_loaded_nonnegative("weight", weight_);
        detail::check_loaded_finite("mean", mean_);
        detail::check_loaded_finite("mean low", mean_low_);
        detail::check_loaded_nonnegative("m2", m2_);
        sse_.check_loaded("sse");
        if (sse_.value() < 0)
            detail::fail_loaded("sse", "is negative");
        const bool empty =
            ymin_ == std::numeric_limits<double>::infinity() && ymax_ == -std::numeric_limits<double>::infinity();
        if (!empty && !(std::isfinite(ymin_) && std::isfinite(ymax_) && ymin_ <= ymax_))
            detail::fail_loaded("truth range", "not an empty range nor finite min <= max");
    }

private:
    static std::string_view who() { return "measure R-squared"; }

    /// The summary of a set of rows (one batch, or another accumulator): weights, m2 and SSE
    /// in units of 2^unit, the mean as hi + low.
    struct part {
        std::int32_t unit = 0;
        double weight = 0, mean = 0, mean_low = 0, m2 = 0;
        detail::compensated_sum sse{};
        double lo = std::numeric_limits<double>::infinity(), hi = -std::numeric_limits<double>::infinity();
    };

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

    /// One batch: weights scaled by a power of two that brings the largest to [1, 2) (exact),
    /// so that no scale of the weights overflows or underflows the sums; then the corrected
    /// two-pass centring (compensated sums) about the batch's rounded mean m, whose rounding
    /// c / W (c = sum w (y - m)) is kept as the low part of the mean: merges then see the
    /// exact mean even when the truth has a large common offset.
    template <class T, class P, class Wf>
    void add_rows(std::span<const T> t, std::span<const P> p, Wf weight, bool weighted) {
        double top = 1;
        if (weighted) {
            top = 0;
            for (std::size_t i = 0; i < t.size(); ++i)
                top = std::max(top, weight(i));
        }
        const double scale = detail::unit_scale(top);
        part b;
        b.unit = static_cast<std::int32_t>(-std::ilogb(scale));
        detail::compensated_sum w, wy, c, m2;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = weight(i) * scale, y = static_cast<double>(t[i]);
            w.add(wi);
            wy.add(wi * y);
            if (wi > 0) {
                b.lo = y < b.lo ? y : b.lo;
                b.hi = y > b.hi ? y : b.hi;
            }
        }
        b.weight = w.value();
        b.mean = b.weight > 0 ? wy.value() / b.weight : 0.0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = weight(i) * scale, y = static_cast<double>(t[i]), e = y - static_cast<double>(p[i]);
            const double d = y - b.mean;
            c.add(wi * d);
            m2.add(wi * d * d);
            b.sse.add(wi * e * e);
        }
        if (!std::isfinite(b.sse.value()) || !std::isfinite(m2.value()) || !std::isfinite(b.mean))
            detail::fail(who(), "prediction", "arithmetic overflow (values too large for double)");
        if (b.weight > 0) {
            b.mean_low = c.value() / b.weight;
            b.m2 = m2.value() - c.value() * c.value() / b.weight;
        }
        count_ += t.size();
        combine(b);
    }

    /// x 2^k for k <= 0, exact unless the result is subnormal (a part 2^1000 times lighter).
    static double down(double x, std::int64_t k) noexcept { return k == 0 ? x : std::ldexp(x, static_cast<int>(k)); }
    static void down(detail::compensated_sum& s, std::int64_t k) noexcept {
        s.sum = down(s.sum, k);
        s.carry = down(s.carry, k);
    }

    /// Chan, Golub & LeVeque (1979) pairwise update, in the larger of the two weight units,
    /// with the mean difference d taken from both parts of both means.
    void combine(part b) {
        ymin_ = b.lo < ymin_ ? b.lo : ymin_;
        ymax_ = b.hi > ymax_ ? b.hi : ymax_;
        if (!(b.weight > 0))
            return;
        if (!(weight_ > 0)) {
            unit_ = b.unit;
            weight_ = b.weight;
            mean_ = b.mean;
            mean_low_ = b.mean_low;
            m2_ = b.m2;
            sse_ = b.sse;
            return;
        }
        const std::int32_t unit = std::max(unit_, b.unit);
        const std::int64_t mine = std::int64_t{unit_} - unit, theirs = std::int64_t{b.unit} - unit;
        weight_ = down(weight_, mine);
        m2_ = down(m2_, mine);
        down(sse_, mine);
        b.weight = down(b.weight, theirs);
        b.m2 = down(b.m2, theirs);
        down(b.sse, theirs);
        unit_ = unit;
        sse_.merge(b.sse);
        const double wn = weight_ + b.weight;
        const double d = (b.mean - mean_) + (b.mean_low - mean_low_);
        const double step = d * (b.weight / wn);
        // mean + mean_low + step, renormalised (Knuth's two-sum) so that mean_low stays below
        // half an ulp of mean.
        const double s = mean_ + step, bb = s - mean_;
        const double err = (mean_ - (s - bb)) + (step - bb);
        const double low = mean_low_ + err;
        mean_ = s + low;
        mean_low_ = low - (mean_ - s);
        m2_ += b.m2 + d * d * (weight_ * (b.weight / wn));
        weight_ = wn;
    }

    std::uint64_t count_ = 0;
    std::int32_t unit_ = 0;
    double weight_ = 0, mean_ = 0, mean_low_ = 0, m2_ = 0;
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
