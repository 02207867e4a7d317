// heldout/calibration/recalibration.hpp — logistic recalibration of probabilities (Cox 1958):
// the calibration slope, the calibration intercept (calibration-in-the-large), and the fit
// behind them.
//
//   using namespace heldout;
//   double slope = evaluate(measure::calibration_slope{}, y, p);          // ideal 1
//   double large = evaluate(measure::calibration_intercept{}, y, p);      // ideal 0
//   recalibration_fit f = logistic_recalibration(y, p);                  // a, b, their se and covariance
//   aggregator agg(measure::calibration_slope{});
//   agg.record(test_set, y, p);
//   estimate e = agg.estimate(measure::calibration_slope{});              // ci::automatic -> ci::wald
//
// Cox DR (1958) "Two further applications of a model for binary regression", Biometrika
// 45:562-565. With x_i = logit(p_i) = log p_i - log(1 - p_i) and 0/1 truth y_i, fit by
// maximum likelihood (weights w_i as frequency weights, as R's glm prior weights)
//   slope:     logit P(y_i = 1) = a + b x_i          -> calibration_slope = b
//   intercept: logit P(y_i = 1) = a + x_i  (offset)  -> calibration_intercept = a
// Perfect calibration is b = 1 and a = 0: these measures declare an ideal value instead of a
// direction (direction::toward_ideal), and comparisons rank them by |value - ideal|. b < 1
// says the predictions are too extreme (overfitting), b > 1 too moderate; a < 0 says they
// are too high on average, a > 0 too low.
//
// The fit is Newton-Raphson on the log-likelihood (= Fisher scoring = IRLS for the logit
// link) from b = 1, a = mean x (the model as given), with step halving whenever a step does
// not raise the log-likelihood, and x centred on its weighted mean so that the 2 x 2
// information is well conditioned; it stops when a step changes no parameter by more than
// 1e-12 (1 + |parameter|), at most 200 steps. It is written here because no library the
// project uses fits a GLM (Eigen solves linear systems, Boost.Math has distributions), and
// a two-parameter Newton step is a 2 x 2 solve in closed form. The standard errors are the
// square roots of the diagonal of the inverse information at the estimate (observed =
// expected information for the canonical link), as summary.glm reports.
//
// Inputs and undefined cases: truth 0/1 (any numeric type), probabilities strictly inside
// (0, 1) (0 and 1 have no logit: input_error naming the row; clip them first if they are
// meant as near-certainties), non-negative weights. undefined_error, never a value, when the
// maximum-likelihood estimate does not exist: one class only (both measures); every
// logit(p) equal (slope: not identifiable); the logits separate the classes, completely or
// quasi-completely (slope: the estimate is infinite; Albert & Anderson 1984). The value does
// not depend on the scale of the weights (they are rescaled by a power of two, exactly);
// the standard error treats them as frequencies.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// The two-parameter logistic recalibration logit P(y = 1) = intercept + slope logit(p).
struct recalibration_fit {
    double intercept = 0;    ///< a
    double slope = 0;        ///< b
    double se_intercept = 0; ///< sqrt of the inverse information's (a, a) entry
    double se_slope = 0;     ///< sqrt of its (b, b) entry
    double covariance = 0;   ///< its (a, b) entry
    std::size_t iterations = 0;
};

namespace detail::recal {

/// The rows a recalibration fit needs: logit(p), truth, weight.
struct rows {
    std::vector<double> x;
    std::vector<std::uint8_t> y;
    std::vector<double> w;

    void clear() noexcept {
        x.clear();
        y.clear();
        w.clear();
    }
    std::size_t size() const noexcept { return x.size(); }
};

inline double logit(double p) { return std::log(p) - std::log1p(-p); }

/// log(1 + e^eta) without overflow.
inline double log1p_exp(double eta) { return eta > 0 ? eta + std::log1p(std::exp(-eta)) : std::log1p(std::exp(eta)); }

inline double expit(double eta) {
    if (eta >= 0)
        return 1.0 / (1.0 + std::exp(-eta));
    const double e = std::exp(eta);
    return e / (1.0 + e);
}

/// Validates and appends rows (nothing is appended if any row is refused).
template <class T, class P, class W>
void append(rows& r, std::string_view who, const T& truth, const P& prediction, const W* weights) {
    const auto t = values_of(truth, who, "truth");
    const auto p = values_of(prediction, who, "prediction");
    check_nonempty(who, "truth", t.size());
    check_same_size(who, "prediction", t.size(), p.size());
    for (std::size_t i = 0; i < t.size(); ++i)
        if (!(t[i] == 0 || t[i] == 1))
            fail_at(who, "truth", "label outside the classes 0..1", i);
    for (std::size_t i = 0; i < p.size(); ++i) {
        const double v = static_cast<double>(p[i]);
        if (std::isnan(v))
            fail_at(who, "prediction", "not finite (nan)", i);
        if (!(v > 0.0 && v < 1.0))
            fail_at(who, "prediction",
                    "probability " + number_text(v) +
                        " has no logit: logistic recalibration needs probabilities strictly inside (0, 1)",
                    i);
    }
    if (weights) {
        const auto w = values_of(*weights, who, "weights");
        check_same_size(who, "weights", t.size(), w.size());
        check_weights(who, w);
    }
    const std::size_t n0 = r.size();
    r.x.reserve(n0 + t.size());
    r.y.reserve(n0 + t.size());
    r.w.reserve(n0 + t.size());
    for (std::size_t i = 0; i < t.size(); ++i) {
        r.x.push_back(logit(static_cast<double>(p[i])));
        r.y.push_back(t[i] == 1 ? 1 : 0);
    }
    if (weights) {
        const auto w = values_of(*weights, who, "weights");
        for (std::size_t i = 0; i < w.size(); ++i)
            r.w.push_back(static_cast<double>(w[i]));
    } else {
        r.w.insert(r.w.end(), t.size(), 1.0);
    }
}

/// The power of two s with max_i w_i s in [1, 2) (1 when every weight is 0).
inline double weight_scale(std::span<const double> w) {
    double top = 0;
    for (const double v : w)
        top = std::max(top, v);
    if (!(top > 0))
        return 1.0;
    int e = 0;
    (void)std::frexp(top, &e); // top = f 2^e, f in [0.5, 1)
    return std::ldexp(1.0, 1 - e);
}

/// Checks that the estimate exists (Albert & Anderson 1984); `slope` adds the conditions of
/// the two-parameter model. Rows of weight 0 do not count.
inline void check_exists(const rows& r, std::string_view who, bool slope) {
    double min0 = std::numeric_limits<double>::infinity(), max0 = -min0, min1 = min0, max1 = -min0;
    bool any0 = false, any1 = false;
    for (std::size_t i = 0; i < r.size(); ++i) {
        if (!(r.w[i] > 0))
            continue;
        if (r.y[i]) {
            any1 = true;
            min1 = std::min(min1, r.x[i]);
            max1 = std::max(max1, r.x[i]);
        } else {
            any0 = true;
            min0 = std::min(min0, r.x[i]);
            max0 = std::max(max0, r.x[i]);
        }
    }
    if (!any0 && !any1)
        fail_undefined(who, r.size() == 0 ? "no observations" : "total weight is zero");
    if (!any0 || !any1)
        fail_undefined(who, std::string("only one class in the truth (every row of positive weight is ") +
                                (any1 ? "1" : "0") + "): the maximum-likelihood estimate is infinite");
    if (!slope)
        return;
    if (std::min(min0, min1) == std::max(max0, max1))
        fail_undefined(who, "every probability is the same: the slope is not identifiable");
    if (!(max0 > min1) || !(max1 > min0))
        fail_undefined(who, "logit(p) separates the classes (every row of one class has a logit no lower than every "
                            "row of the other): the maximum-likelihood slope is infinite");
}

struct fit_sums {
    double loglik = 0;
    double g0 = 0, g1 = 0;            // score
    double h00 = 0, h01 = 0, h11 = 0; // information
};

/// Log-likelihood, score and information at eta_i = a + b (x_i - centre) (+ x_i when offset).
inline fit_sums sums_at(const rows& r, double s, double a, double b, double centre, bool offset) {
    compensated_sum ll, g0, g1, h00, h01, h11;
    for (std::size_t i = 0; i < r.size(); ++i) {
        const double w = r.w[i] * s;
        if (w == 0)
            continue;
        const double xc = r.x[i] - centre;
        const double eta = offset ? a + r.x[i] : a + b * xc;
        const double y = r.y[i];
        ll.add(w * (y * eta - log1p_exp(eta)));
        const double mu = expit(eta);
        const double res = w * (y - mu);
        const double v = w * mu * (1.0 - mu);
        g0.add(res);
        h00.add(v);
        if (!offset) {
            g1.add(res * xc);
            h01.add(v * xc);
            h11.add(v * xc * xc);
        }
    }
    return {ll.value(), g0.value(), g1.value(), h00.value(), h01.value(), h11.value()};
}

/// Newton-Raphson with step halving (see the header comment). `offset`: the one-parameter
/// model a + x. Weights are rescaled by s (a power of two) and the se scaled back.
inline recalibration_fit fit(const rows& r, std::string_view who, bool offset) {
    check_exists(r, who, !offset);
    const double s = weight_scale(r.w);
    double centre = 0;
    if (!offset) {
        compensated_sum sw, swx;
        for (std::size_t i = 0; i < r.size(); ++i) {
            sw.add(r.w[i] * s);
            swx.add(r.w[i] * s * r.x[i]);
        }
        centre = swx.value() / sw.value();
    }
    double a = offset ? 0.0 : centre, b = 1.0;
    fit_sums cur = sums_at(r, s, a, b, centre, offset);
    constexpr std::size_t max_steps = 200;
    std::size_t it = 0;
    for (; it < max_steps; ++it) {
        double da = 0, db = 0;
        if (offset) {
            da = cur.g0 / cur.h00;
        } else {
            const double det = cur.h00 * cur.h11 - cur.h01 * cur.h01;
            if (!(det > 0))
                fail_undefined(who, "the information matrix is singular at the current estimate");
            da = (cur.h11 * cur.g0 - cur.h01 * cur.g1) / det;
            db = (cur.h00 * cur.g1 - cur.h01 * cur.g0) / det;
        }
        if (!std::isfinite(da) || !std::isfinite(db))
            fail_undefined(who, "the Newton step is not finite (the information vanished)");
        // Step halving: accept the first step that does not lower the log-likelihood.
        double f = 1.0;
        fit_sums next;
        int halvings = 0;
        for (;; ++halvings) {
            next = sums_at(r, s, a + f * da, b + f * db, centre, offset);
            if (next.loglik >= cur.loglik || halvings == 60)
                break;
            f *= 0.5;
        }
        a += f * da;
        b += f * db;
        cur = next;
        if (std::abs(f * da) <= 1e-12 * (1.0 + std::abs(a)) && std::abs(f * db) <= 1e-12 * (1.0 + std::abs(b))) {
            ++it;
            break;
        }
    }
    if (it == max_steps)
        fail_undefined(who, "the Newton iteration did not converge in 200 steps");
    recalibration_fit out;
    out.iterations = it;
    // Inverse information in the scaled weights, back to the given ones: I = I_s / s.
    if (offset) {
        out.intercept = a;
        out.slope = 1.0;
        out.se_intercept = std::sqrt(s / cur.h00);
        return out;
    }
    const double det = cur.h00 * cur.h11 - cur.h01 * cur.h01;
    // Centred parameters (a_c, b): a = a_c - b centre, so var(a) = var(a_c) - 2 centre
    // cov(a_c, b) + centre^2 var(b), cov(a, b) = cov(a_c, b) - centre var(b).
    const double vac = s * cur.h11 / det, vb = s * cur.h00 / det, cab = -s * cur.h01 / det;
    out.slope = b;
    out.intercept = a - b * centre;
    out.se_slope = std::sqrt(vb);
    out.se_intercept = std::sqrt(std::max(0.0, vac - 2.0 * centre * cab + centre * centre * vb));
    out.covariance = cab - centre * vb;
    return out;
}

inline std::string_view slope_who() { return "measure calibration slope"; }
inline std::string_view intercept_who() { return "measure calibration intercept"; }

} // namespace detail::recal

/// The two-parameter logistic recalibration of probabilities p against 0/1 truth.
template <value_range T, real_range P>
recalibration_fit logistic_recalibration(const T& truth, const P& probability) {
    constexpr std::string_view who = "heldout::logistic_recalibration";
    detail::recal::rows r;
    detail::recal::append(r, who, truth, probability, static_cast<const std::vector<double>*>(nullptr));
    return detail::recal::fit(r, who, false);
}
/// The same with non-negative frequency weights.
template <value_range T, real_range P, weight_range W>
recalibration_fit logistic_recalibration(const T& truth, const P& probability, const W& weights) {
    constexpr std::string_view who = "heldout::logistic_recalibration";
    detail::recal::rows r;
    detail::recal::append(r, who, truth, probability, &weights);
    return detail::recal::fit(r, who, false);
}

namespace measure {

struct calibration_slope;
struct calibration_intercept;

/// Running state of calibration_slope (Slope = true) and calibration_intercept: the rows
/// (logit(p), truth, weight), since the fit needs them all; merge appends.
template <bool Slope>
class recalibration_accumulator {
public:
    using measure_type = std::conditional_t<Slope, calibration_slope, calibration_intercept>;

    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        detail::recal::append(rows_, who(), truth, prediction, static_cast<const std::vector<double>*>(nullptr));
    }
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        detail::recal::append(rows_, who(), truth, prediction, &weights);
    }
    void add_one(double y, double p) { add(std::span<const double>(&y, 1), std::span<const double>(&p, 1)); }
    void add_one(double y, double p, double w) {
        add(std::span<const double>(&y, 1), std::span<const double>(&p, 1), std::span<const double>(&w, 1));
    }
    void merge(const recalibration_accumulator& o) {
        rows_.x.insert(rows_.x.end(), o.rows_.x.begin(), o.rows_.x.end());
        rows_.y.insert(rows_.y.end(), o.rows_.y.begin(), o.rows_.y.end());
        rows_.w.insert(rows_.w.end(), o.rows_.w.begin(), o.rows_.w.end());
    }
    /// The calibration slope (or intercept); undefined_error when the estimate does not exist.
    double value() const { return Slope ? full().slope : full().intercept; }
    /// The value with its inverse-information standard error.
    fitted_value fitted() const {
        const auto f = full();
        return Slope ? fitted_value{f.slope, f.se_slope, f.iterations}
                     : fitted_value{f.intercept, f.se_intercept, f.iterations};
    }
    void reset() noexcept { rows_.clear(); }
    std::uint64_t count() const noexcept { return rows_.size(); }
    measure_type measure() const;

private:
    static std::string_view who() { return Slope ? detail::recal::slope_who() : detail::recal::intercept_who(); }
    recalibration_fit full() const { return detail::recal::fit(rows_, who(), !Slope); }
    detail::recal::rows rows_;
};

/// Calibration slope: b in logit P(y = 1) = a + b logit(p) (Cox 1958); ideal 1.
struct calibration_slope {
    static constexpr direction better = direction::toward_ideal;
    static constexpr double ideal = 1.0;
    static constexpr prediction_kind kind = prediction_kind::probability;
    using capabilities = offers<cap::fitted_se>;

    std::string name() const { return "calibration slope"; }
    recalibration_accumulator<true> accumulator() const { return {}; }
    /// The slope and its standard error from the inverse information.
    template <value_range T, real_range P>
    fitted_value fitted(const T& truth, const P& prediction) const {
        auto a = accumulator();
        a.add(truth, prediction);
        return a.fitted();
    }
};

/// Calibration intercept (calibration-in-the-large): a in logit P(y = 1) = a + logit(p),
/// the slope fixed at 1 (Cox 1958); ideal 0.
struct calibration_intercept {
    static constexpr direction better = direction::toward_ideal;
    static constexpr double ideal = 0.0;
    static constexpr prediction_kind kind = prediction_kind::probability;
    using capabilities = offers<cap::fitted_se>;

    std::string name() const { return "calibration intercept"; }
    recalibration_accumulator<false> accumulator() const { return {}; }
    /// The intercept and its standard error from the inverse information.
    template <value_range T, real_range P>
    fitted_value fitted(const T& truth, const P& prediction) const {
        auto a = accumulator();
        a.add(truth, prediction);
        return a.fitted();
    }
};

template <bool Slope>
typename recalibration_accumulator<Slope>::measure_type recalibration_accumulator<Slope>::measure() const {
    return {};
}

} // namespace measure
HELDOUT_NAMESPACE_END
