// heldout/estimate/newcombe_auc.hpp — a small-sample interval for the ROC AUC (the
// Mann-Whitney effect size): Newcombe's score-type interval with the Hanley-McNeil variance
// and his N* = (m + n)/2 - 1 modification (Newcombe 2006, Statistics in Medicine 25:559-573,
// "method 10" as we recall it; the paper could not be reached from here).
//
//   auto e = heldout::newcombe_auc_interval(truth, scores);            // e.value, e.lower, e.upper
//   auto f = heldout::newcombe_auc_interval(0.8, 5, 5, 0.95);          // from the AUC and the class counts
//
// Definitions. m positives, n negatives, N* = (m + n)/2 - 1, and for an AUC theta
//   V(theta) = theta (1 - theta) [1 + N* ((1 - theta)/(2 - theta) + theta/(1 + theta))] / (m n),
// which is Hanley & McNeil's (1982) variance with Q1 = theta/(2 - theta), Q2 = 2 theta^2/(1 + theta)
// and both m - 1 and n - 1 replaced by N* (equal to it when m = n). The interval is every theta
// with (A - theta)^2 <= z^2 V(theta) — the variance is taken at the candidate value, as in the
// Wilson interval for a proportion, not at the estimate — so it stays inside [0, 1] and is
// defined at A = 0 and A = 1, where the DeLong variance is zero. Each bound is the root of
// (A - theta)^2 - z^2 V(theta) on [0, A] and on [A, 1], found by bisection to full precision.
// se is sqrt(V(A)) (0 when A is 0 or 1). Why this one: with 5 positives and 5 negatives the
// DeLong logit interval covers less than its level and is undefined whenever the classes
// separate; this interval's coverage there is measured in the shipped coverage study
// (examples/coverage/, docs/intervals.md), not assumed.
// Errors: bad truth/scores as for measure::auc (input_error), a level outside (0, 1), fewer
// than 1 positive or 1 negative, an AUC outside [0, 1] -> input_error.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/estimate/delong.hpp>

#include <boost/math/distributions/normal.hpp>

#include <cmath>
#include <cstddef>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// Hanley-McNeil variance of an AUC theta with Newcombe's N* for both class counts.
inline double newcombe_variance(double theta, double m, double n) {
    const double nstar = (m + n) / 2 - 1;
    return theta * (1 - theta) * (1 + nstar * ((1 - theta) / (2 - theta) + theta / (1 + theta))) / (m * n);
}

} // namespace detail

/// Newcombe's score-type interval of an AUC a from m positives and n negatives.
template <class = void>
auc_estimate newcombe_auc_interval(double a, std::size_t positives, std::size_t negatives, double level = 0.95) {
    constexpr std::string_view who = "heldout::newcombe_auc_interval";
    if (!(a >= 0 && a <= 1))
        detail::fail(who, "auc", "must lie in [0, 1], got " + detail::number_text(a));
    if (positives < 1)
        detail::fail(who, "positives", "at least 1 positive is needed");
    if (negatives < 1)
        detail::fail(who, "negatives", "at least 1 negative is needed");
    if (!(level > 0 && level < 1))
        detail::fail(who, "level", "must lie in (0, 1), got " + detail::number_text(level));
    const double z = boost::math::quantile(boost::math::normal(), 0.5 + level / 2);
    const double m = static_cast<double>(positives), n = static_cast<double>(negatives);
    // g(theta) = (a - theta)^2 - z^2 V(theta): >= 0 at theta = 0 and 1 (V = 0 there), <= 0 at
    // theta = a. Bisection keeps the sign change bracketed whatever the shape in between.
    auto g = [&](double theta) { return (a - theta) * (a - theta) - z * z * detail::newcombe_variance(theta, m, n); };
    auto root = [&](double inside, double outside) { // g(inside) <= 0 <= g(outside)
        for (int i = 0; i < 200 && inside != outside; ++i) {
            const double mid = inside + (outside - inside) / 2;
            if (mid == inside || mid == outside)
                break;
            (g(mid) <= 0 ? inside : outside) = mid;
        }
        return inside;
    };
    auc_estimate e;
    e.value = a;
    e.level = level;
    e.se = std::sqrt(detail::newcombe_variance(a, m, n));
    e.lower = a > 0 ? root(a, 0.0) : 0.0;
    e.upper = a < 1 ? root(a, 1.0) : 1.0;
    return e;
}

/// Newcombe's score-type interval of the AUC of scores for 0/1 truth (1 = positive).
template <label_range T, real_range S>
auc_estimate newcombe_auc_interval(const T& truth, const S& scores, double level = 0.95) {
    constexpr std::string_view who = "heldout::newcombe_auc_interval";
    using E = element_t<S>;
    static_assert(detail::rankable_score_v<E>, "heldout: ranking measures take float or double scores");
    auto y = values_of(truth, who, "truth");
    auto s = values_of(scores, who, "scores");
    auto& sc = detail::thread_scratch();
    const auto sr = detail::sort_rows(who, s, y, sc);
    const auto r = detail::doubled_mann_whitney(sr);
    detail::check_both_classes(who, static_cast<double>(r.positives), static_cast<double>(r.negatives), false);
    const double a = static_cast<double>(static_cast<long double>(r.doubled_u) /
                                         (2.0L * static_cast<long double>(r.positives) * r.negatives));
    return newcombe_auc_interval(a, static_cast<std::size_t>(r.positives), static_cast<std::size_t>(r.negatives),
                                 level);
}

HELDOUT_NAMESPACE_END
