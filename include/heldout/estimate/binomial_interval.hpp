// heldout/estimate/binomial_interval.hpp — confidence intervals for a binomial proportion,
// e.g. the error rate of a classifier on one test set (k errors out of n rows).
//
//   heldout::proportion_interval w = heldout::wilson_interval(12, 200, 0.95);
//   // w.estimate = 0.06, w.lower, w.upper, w.level
//   auto cp = heldout::clopper_pearson_interval(0, 50);      // level defaults to 0.95
//   auto ac = heldout::agresti_coull_interval(1, 29);
//   auto cc = heldout::wilson_cc_interval(12, 200);
//
// Methods (z = z_{1-a/2}, p = k/n):
//  * Wilson score (Wilson 1927, JASA 22:209-212): the roots in q of (p - q)^2 = z^2 q(1-q)/n.
//    Lower bound exactly 0 at k = 0 and upper exactly 1 at k = n (floating point would
//    leave -1e-17 there); otherwise clamped to [0, 1].
//  * Wilson with continuity correction (Newcombe 1998, Stat. Med. 17:857-872, method 4);
//    0 at k = 0, 1 at k = n, clamped to [0, 1].
//  * Clopper-Pearson (Clopper & Pearson 1934, Biometrika 26:404-413): beta quantiles
//    L = Beta^-1(a/2; k, n-k+1), U = Beta^-1(1-a/2; k+1, n-k) through Boost.Math ibeta_inv,
//    with L = 0 at k = 0 and U = 1 at k = n; each tail gets a/2 even at k = 0 or n.
//  * Agresti-Coull (Agresti & Coull 1998, Am. Stat. 52:119-126): n' = n + z^2,
//    p' = (k + z^2/2)/n', p' +- z sqrt(p'(1-p')/n'), truncated to [0, 1] (it can leave it,
//    e.g. 0/20 and 1/29).
// Policies: n = 0, k < 0, k > n, or a level outside (0, 1) -> input_error.
// These intervals assume independent rows: one holdout set, not pooled cross-validation
// predictions (whose errors are dependent).
#pragma once

#include <heldout/estimate/t_interval.hpp>

#include <boost/math/special_functions/beta.hpp>

#include <algorithm>
#include <cmath>
#include <concepts>
#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// An interval for a proportion k/n: the point estimate, the bounds and the level.
struct proportion_interval {
    double lower = 0;
    double upper = 0;
    double estimate = 0;
    double level = 0;
};

namespace detail {

template <std::integral I, std::integral J>
void check_proportion(std::string_view who, I k, J n, double level) {
    if constexpr (std::is_signed_v<J>)
        if (n < 0)
            fail(who, "n", "negative count " + std::to_string(static_cast<long long>(n)));
    if (n == 0)
        fail(who, "n", "no observations (n = 0)");
    if constexpr (std::is_signed_v<I>)
        if (k < 0)
            fail(who, "k", "negative count " + std::to_string(static_cast<long long>(k)));
    if (static_cast<std::uint64_t>(k) > static_cast<std::uint64_t>(n))
        fail(who, "k",
             "count " + std::to_string(static_cast<unsigned long long>(k)) +
                 " exceeds n = " + std::to_string(static_cast<unsigned long long>(n)));
    check_level(who, level);
}

inline double clamp01(double x) { return std::min(1.0, std::max(0.0, x)); }

template <class = void>
proportion_interval wilson(std::uint64_t k, std::uint64_t n, double level) {
    const double z = two_sided_z(level);
    const double nn = static_cast<double>(n);
    const double p = static_cast<double>(k) / nn;
    const double z2 = z * z;
    // Newcombe's arrangement (also scipy's): centre (2np + z^2)/(2(n + z^2)).
    const double denom = 2.0 * (nn + z2);
    const double centre = (2.0 * nn * p + z2) / denom;
    const double half = z / denom * std::sqrt(4.0 * nn * p * (1.0 - p) + z2);
    proportion_interval r;
    r.estimate = p;
    r.level = level;
    r.lower = k == 0 ? 0.0 : clamp01(centre - half);
    r.upper = k == n ? 1.0 : clamp01(centre + half);
    return r;
}

template <class = void>
proportion_interval wilson_cc(std::uint64_t k, std::uint64_t n, double level) {
    const double z = two_sided_z(level);
    const double nn = static_cast<double>(n);
    const double p = static_cast<double>(k) / nn;
    const double q = 1.0 - p;
    const double z2 = z * z;
    const double denom = 2.0 * (nn + z2);
    const double centre = (2.0 * nn * p + z2) / denom;
    proportion_interval r;
    r.estimate = p;
    r.level = level;
    // The square-root arguments are >= z^2 + 2 - 1/n > 0 whenever the branch is taken.
    r.lower =
        k == 0 ? 0.0 : clamp01(centre - (1.0 + z * std::sqrt(z2 - 2.0 - 1.0 / nn + 4.0 * p * (nn * q + 1.0))) / denom);
    r.upper =
        k == n ? 1.0 : clamp01(centre + (1.0 + z * std::sqrt(z2 + 2.0 - 1.0 / nn + 4.0 * p * (nn * q - 1.0))) / denom);
    return r;
}

template <class = void>
proportion_interval clopper_pearson(std::uint64_t k, std::uint64_t n, double level) {
    const double a = 1.0 - level;
    const double kk = static_cast<double>(k);
    const double nn = static_cast<double>(n);
    proportion_interval r;
    r.estimate = kk / nn;
    r.level = level;
    r.lower = k == 0 ? 0.0 : boost::math::ibeta_inv(kk, nn - kk + 1.0, a / 2);
    r.upper = k == n ? 1.0 : boost::math::ibeta_inv(kk + 1.0, nn - kk, 1.0 - a / 2);
    return r;
}

template <class = void>
proportion_interval agresti_coull(std::uint64_t k, std::uint64_t n, double level) {
    const double z = two_sided_z(level);
    const double z2 = z * z;
    const double nt = static_cast<double>(n) + z2;
    const double pt = (static_cast<double>(k) + z2 / 2) / nt;
    const double half = z * std::sqrt(pt * (1.0 - pt) / nt);
    proportion_interval r;
    r.estimate = static_cast<double>(k) / static_cast<double>(n);
    r.level = level;
    r.lower = clamp01(pt - half);
    r.upper = clamp01(pt + half);
    return r;
}

} // namespace detail

/// Wilson score interval for k successes (or errors) out of n.
template <std::integral I, std::integral J>
proportion_interval wilson_interval(I k, J n, double level = 0.95) {
    detail::check_proportion("heldout::wilson_interval", k, n, level);
    return detail::wilson(static_cast<std::uint64_t>(k), static_cast<std::uint64_t>(n), level);
}

/// Wilson score interval with continuity correction (Newcombe 1998, method 4).
template <std::integral I, std::integral J>
proportion_interval wilson_cc_interval(I k, J n, double level = 0.95) {
    detail::check_proportion("heldout::wilson_cc_interval", k, n, level);
    return detail::wilson_cc(static_cast<std::uint64_t>(k), static_cast<std::uint64_t>(n), level);
}

/// Clopper-Pearson "exact" interval (beta quantiles, a/2 in each tail).
template <std::integral I, std::integral J>
proportion_interval clopper_pearson_interval(I k, J n, double level = 0.95) {
    detail::check_proportion("heldout::clopper_pearson_interval", k, n, level);
    return detail::clopper_pearson(static_cast<std::uint64_t>(k), static_cast<std::uint64_t>(n), level);
}

/// Agresti-Coull interval, truncated to [0, 1].
template <std::integral I, std::integral J>
proportion_interval agresti_coull_interval(I k, J n, double level = 0.95) {
    detail::check_proportion("heldout::agresti_coull_interval", k, n, level);
    return detail::agresti_coull(static_cast<std::uint64_t>(k), static_cast<std::uint64_t>(n), level);
}

HELDOUT_NAMESPACE_END
