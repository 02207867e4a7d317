// heldout/estimate/t_interval.hpp — Student-t and normal (Wald) confidence intervals for
// the mean of per-observation losses on one test set.
//
//   std::vector<double> losses = ...;                    // e.g. squared errors on a holdout set
//   heldout::mean_interval t = heldout::t_interval(losses, 0.95);
//   // t.mean, t.se, t.lower, t.upper, t.df (= n - 1), t.n
//   heldout::mean_interval z = heldout::normal_interval(losses, 0.95);   // df = +inf
//
// Formulas (Student 1908, Biometrika 6:1-25): m = mean, s = sd with denominator n - 1,
// se = s / sqrt(n); t interval m +- t_{1-a/2, n-1} se; normal interval m +- z_{1-a/2} se.
// The variance is computed in two passes (mean first, then the compensated sum of squared
// deviations), because the one-pass sum(x^2) - n m^2 cancels catastrophically for large
// losses with a small spread; both passes work on the values scaled by a power of two (exact),
// so losses near +-1e308 give the right interval, and a bound beyond the double range is an
// input_error rather than an infinity. Quantiles come from Boost.Math (students_t, normal), which
// agree with R's qt to ~2e-15 relative (tested to 1e-12).
//
// Policies: n = 0 or a non-finite loss -> input_error; n = 1 -> undefined_error (no
// variance); s = 0 gives a zero-width interval (the formula's value, as for any constant
// sample). These intervals assume independent losses: they are valid on one holdout set,
// not on pooled cross-validation losses (use nested_cv_interval or corrected_resampled_t).
// For an error rate (0/1 losses) prefer wilson_interval (binomial_interval.hpp): the t
// interval can leave [0, 1].
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <span>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// A confidence level must lie strictly between 0 and 1.
inline void check_level(std::string_view who, double level) {
    if (!(level > 0.0 && level < 1.0))
        fail(who, "level", "confidence level " + number_text(level) + " outside (0, 1)");
}

// The Boost.Math wrappers below, and every function that calls them, are templates with an
// unused parameter: a non-template inline function would instantiate the Boost quantile and cdf
// code in every translation unit that includes heldout, used or not (bench/include_cost.sh).

/// Standard normal quantile (Boost.Math).
template <class = void>
double normal_quantile(double p) {
    return boost::math::quantile(boost::math::normal_distribution<double>(), p);
}

/// Standard normal CDF (Boost.Math).
template <class = void>
double normal_cdf(double x) {
    return boost::math::cdf(boost::math::normal_distribution<double>(), x);
}

/// z_{1 - (1 - level)/2}, the two-sided normal critical value.
template <class = void>
double two_sided_z(double level) {
    return boost::math::quantile(
        boost::math::complement(boost::math::normal_distribution<double>(), (1.0 - level) / 2));
}

/// t_{1 - (1 - level)/2, df}, the two-sided Student-t critical value.
template <class = void>
double two_sided_t(double level, double df) {
    return boost::math::quantile(
        boost::math::complement(boost::math::students_t_distribution<double>(df), (1.0 - level) / 2));
}

/// Two-sided p-value of a t statistic with df degrees of freedom.
template <class = void>
double two_sided_t_p(double t, double df) {
    return 2.0 *
           boost::math::cdf(boost::math::complement(boost::math::students_t_distribution<double>(df), std::abs(t)));
}

/// Mean and sample variance (denominator n - 1) in two compensated passes, on the values
/// scaled by the power of two `unit` that brings the largest |x| to [1, 2) (exact): values
/// near +-1e308 neither overflow the sum nor the squares, nor do values near 1e-200 underflow
/// the squares. `variance` itself is +inf (or 0) when it leaves the double range; test
/// scaled_variance for zero, and use root(c) = sqrt(c * variance), finite whenever the result is.
struct mean_variance {
    double mean = 0;
    double variance = 0;
    double scaled_variance = 0; ///< variance * unit^2
    double unit = 1;
    /// sqrt(c * variance), computed in the scaled units (the same bits when nothing overflows).
    double root(double c) const { return std::sqrt(c * scaled_variance) / unit; }
    /// sqrt(variance / n), likewise.
    double root_over(double n) const { return std::sqrt(scaled_variance / n) / unit; }
};

template <class T>
mean_variance two_pass_mean_variance(std::span<const T> v) {
    // Equal values give exactly (x, 0): x + x + x divided by 3 need not round back to x.
    if (std::all_of(v.begin(), v.end(), [&](const T& x) { return x == v[0]; }))
        return {static_cast<double>(v[0]), 0.0, 0.0, 1.0};
    double top = 0;
    for (const T& x : v)
        top = std::max(top, std::abs(static_cast<double>(x)));
    const double unit = unit_scale(top);
    compensated_sum s;
    for (const T& x : v)
        s.add(static_cast<double>(x) * unit);
    const double m = s.value() / static_cast<double>(v.size());
    compensated_sum q;
    for (const T& x : v) {
        const double d = static_cast<double>(x) * unit - m;
        q.add(d * d);
    }
    const double var = v.size() > 1 ? q.value() / static_cast<double>(v.size() - 1) : 0.0;
    return {m / unit, var / unit / unit, var, unit};
}

/// Throws when a bound of an interval leaves the double range (mean +- q se beyond 1.8e308).
inline void check_bounds(std::string_view who, std::string_view arg, double lower, double upper) {
    if (!std::isfinite(lower) || !std::isfinite(upper))
        fail(who, arg, "arithmetic overflow: the interval's bounds exceed the double range (values too large)");
}

} // namespace detail

/// An interval for a mean: centre, standard error, bounds, level, degrees of freedom
/// (+inf for the normal interval) and the number of observations.
struct mean_interval {
    double mean = 0;
    double se = 0;
    double lower = 0;
    double upper = 0;
    double level = 0;
    double df = 0;
    std::size_t n = 0;
};

namespace detail {
template <class R>
mean_interval mean_interval_of(const R& losses, double level, bool student, std::string_view who) {
    auto v = values_of(losses, who, "losses");
    check_nonempty(who, "losses", v.size());
    check_finite(who, "losses", v);
    check_level(who, level);
    if (v.size() < 2)
        fail_undefined(who, "one observation has no variance (n = 1)");
    const auto mv = two_pass_mean_variance(v);
    const double n = static_cast<double>(v.size());
    mean_interval r;
    r.mean = mv.mean;
    r.se = mv.root_over(n);
    r.level = level;
    r.n = v.size();
    r.df = student ? n - 1 : std::numeric_limits<double>::infinity();
    const double q = student ? two_sided_t(level, n - 1) : two_sided_z(level);
    r.lower = r.mean - q * r.se;
    r.upper = r.mean + q * r.se;
    check_bounds(who, "losses", r.lower, r.upper);
    return r;
}
} // namespace detail

/// Student-t interval for the mean of independent per-observation losses.
template <value_range R>
mean_interval t_interval(const R& losses, double level = 0.95) {
    return detail::mean_interval_of(losses, level, true, "heldout::t_interval");
}

/// Normal (Wald) interval for the mean of independent per-observation losses.
template <value_range R>
mean_interval normal_interval(const R& losses, double level = 0.95) {
    return detail::mean_interval_of(losses, level, false, "heldout::normal_interval");
}

HELDOUT_NAMESPACE_END
