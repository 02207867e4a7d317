// heldout/planning/test_rows.hpp — how many test rows are needed: for a proportion (an error
// rate) known to a given precision, for an AUC known to a given precision, and for a McNemar
// comparison of two classifiers with a given power.
//
//   std::uint64_t a = heldout::test_rows_for_proportion(0.1, 0.02, 0.95);  // error ~10%, +-2 points: 868
//   std::uint64_t b = heldout::test_rows_for_auc(0.85, 0.2, 0.03, 0.95);   // AUC ~0.85, 20% positives: 1340
//   std::uint64_t c = heldout::test_rows_for_paired_error(0.15, 0.05, 0.05, 0.8);   // 469
//
// Each returns the smallest n for which the target holds, so at n it holds and at n - 1 it
// does not (each criterion is monotone in n, shown in docs/planning.md):
//  * test_rows_for_proportion(expected, half_width, level): the Wilson (1927) interval at
//    p = expected, (upper - lower)/2 = z sqrt(n p (1 - p) + z^2/4) / (n + z^2), is at most
//    half_width (z = the two-sided normal quantile of level).
//  * test_rows_for_auc(expected_auc, prevalence, half_width, level): z SE(A) <= half_width with
//    the standard error of Hanley & McNeil (1982), Radiology 143:29-36 (their formula with
//    Q1, Q2 from the negative-exponential model; the equation number is not cited here):
//      SE^2 = [A(1 - A) + (n1 - 1)(Q1 - A^2) + (n0 - 1)(Q2 - A^2)] / (n1 n0),
//      Q1 = A / (2 - A), Q2 = 2 A^2 / (1 + A),
//    n1 = round(n prevalence) positives (halves rounded up) and n0 = n - n1 negatives, both at
//    least 1 (otherwise the AUC is undefined and the target is not met). Rounding: n1 is
//    n * prevalence rounded to the nearest integer, exact halves up (floor(n pi + 1/2)).
//  * test_rows_for_paired_error(discordant_rate, difference, alpha, power): McNemar's test of
//    two classifiers on the same rows (Connor 1987, Biometrics 43:207-211): with psi the share
//    of rows on which exactly one classifier errs and delta the difference of their error
//    rates (sign ignored), the normal approximation gives the power
//      Phi( (|delta| sqrt(n) - z_{1-alpha/2} sqrt(psi)) / sqrt(psi - delta^2) ),
//    and n is the smallest with that at least `power` (Connor's closed form, rounded up).
// Inputs out of range are an input_error naming the argument; a target needing more than
// 2^53 rows is refused the same way. The functions are templates with an unused parameter so
// that the Boost normal quantile they call is compiled only where they are used
// (bench/include_cost.sh).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/estimate/t_interval.hpp>

#include <cmath>
#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

namespace detail::planning {

inline constexpr double max_rows = 9007199254740992.0; // 2^53: every count is exact in double

inline void check_open_unit(std::string_view who, std::string_view arg, double x) {
    if (!(x > 0.0 && x < 1.0))
        fail(who, arg, "must lie strictly between 0 and 1, got " + number_text(x));
}

/// The smallest n in [1, 2^53] with ok(n), for ok monotone (false ... false true ... true).
template <class F>
std::uint64_t smallest(std::string_view who, std::string_view arg, F&& ok) {
    std::uint64_t hi = 1;
    while (!ok(hi)) {
        if (static_cast<double>(hi) >= max_rows)
            fail(who, arg, "the target needs more than 2^53 test rows");
        hi *= 2;
    }
    std::uint64_t lo = hi / 2; // ok(lo) is false (or lo = 0)
    while (hi - lo > 1) {
        const std::uint64_t mid = lo + (hi - lo) / 2;
        (ok(mid) ? hi : lo) = mid;
    }
    return hi;
}

/// Half-width of the Wilson interval at p with n rows.
inline double wilson_half_width(double p, double n, double z) {
    return z * std::sqrt(n * p * (1.0 - p) + z * z / 4.0) / (n + z * z);
}

/// Hanley & McNeil (1982) standard error of the AUC A with n1 positives and n0 negatives.
inline double hanley_mcneil_se(double a, double n1, double n0) {
    const double q1 = a / (2.0 - a), q2 = 2.0 * a * a / (1.0 + a), a2 = a * a;
    return std::sqrt((a * (1.0 - a) + (n1 - 1.0) * (q1 - a2) + (n0 - 1.0) * (q2 - a2)) / (n1 * n0));
}

/// n1 = round(n prevalence), halves up.
inline std::uint64_t positives(std::uint64_t n, double prevalence) {
    return static_cast<std::uint64_t>(std::floor(static_cast<double>(n) * prevalence + 0.5));
}

/// Connor's (1987) normal-approximation power of McNemar's test.
template <class = void>
double mcnemar_power(double n, double psi, double delta, double alpha) {
    const double za = two_sided_z(1.0 - alpha);
    return normal_cdf((std::abs(delta) * std::sqrt(n) - za * std::sqrt(psi)) / std::sqrt(psi - delta * delta));
}

} // namespace detail::planning

/// Smallest n whose Wilson interval at p = expected has half-width <= half_width.
template <class = void>
std::uint64_t test_rows_for_proportion(double expected, double half_width, double level = 0.95) {
    constexpr std::string_view who = "heldout::test_rows_for_proportion";
    if (!(expected >= 0.0 && expected <= 1.0))
        detail::fail(who, "expected", "must lie in [0, 1], got " + detail::number_text(expected));
    detail::planning::check_open_unit(who, "half_width", half_width);
    detail::check_level(who, level);
    const double z = detail::two_sided_z(level);
    return detail::planning::smallest(who, "half_width", [&](std::uint64_t n) {
        return detail::planning::wilson_half_width(expected, static_cast<double>(n), z) <= half_width;
    });
}

/// Smallest n whose Hanley-McNeil AUC interval half-width z SE is <= half_width.
template <class = void>
std::uint64_t test_rows_for_auc(double expected_auc, double prevalence, double half_width, double level = 0.95) {
    constexpr std::string_view who = "heldout::test_rows_for_auc";
    detail::planning::check_open_unit(who, "expected_auc", expected_auc); // at 0 or 1 the SE is 0
    detail::planning::check_open_unit(who, "prevalence", prevalence);
    detail::planning::check_open_unit(who, "half_width", half_width);
    detail::check_level(who, level);
    const double z = detail::two_sided_z(level);
    return detail::planning::smallest(who, "half_width", [&](std::uint64_t n) {
        const std::uint64_t n1 = detail::planning::positives(n, prevalence);
        if (n1 < 1 || n1 >= n)
            return false;
        return z * detail::planning::hanley_mcneil_se(expected_auc, static_cast<double>(n1),
                                                      static_cast<double>(n - n1)) <=
               half_width;
    });
}

/// Smallest n at which McNemar's test of two classifiers reaches `power` (Connor 1987).
template <class = void>
std::uint64_t test_rows_for_paired_error(double discordant_rate, double difference, double alpha = 0.05,
                                         double power = 0.8) {
    constexpr std::string_view who = "heldout::test_rows_for_paired_error";
    if (!(discordant_rate > 0.0 && discordant_rate <= 1.0))
        detail::fail(who, "discordant_rate", "must lie in (0, 1], got " + detail::number_text(discordant_rate));
    const double d = std::abs(difference);
    if (!(d > 0.0) || !(d < discordant_rate))
        detail::fail(who, "difference",
                     "|difference| must be positive and below discordant_rate " + detail::number_text(discordant_rate) +
                         " (each discordant row favours one classifier), got " + detail::number_text(difference));
    detail::planning::check_open_unit(who, "alpha", alpha);
    detail::planning::check_open_unit(who, "power", power);
    return detail::planning::smallest(who, "difference", [&](std::uint64_t n) {
        return detail::planning::mcnemar_power(static_cast<double>(n), discordant_rate, d, alpha) >= power;
    });
}

HELDOUT_NAMESPACE_END
