// heldout/report/numbers.hpp — numbers for people: an estimate printed with as many digits
// as its interval supports, and p-values that do not pretend to precision.
//
//   heldout::report::interval_decimals(0.7342, 0.8251);       // 3: half-width 0.045 -> 2 digits of it
//   heldout::report::estimate_text(0.77966, 0.7342, 0.8251);  // "0.780 [0.734, 0.825]"
//   heldout::report::p_text(0.00003);                          // "< 0.0001"
//   heldout::report::p_text(0.0437);                           // "0.044"
//
// The rule: show the interval's half-width to two significant digits, and the value and the
// bounds to the same decimal place. More digits than that describe the noise, not the model;
// JSON and CSV exports keep full precision. Without an interval, 4 significant digits.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/report/svg.hpp>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <optional>
#include <string>
#include <system_error>

HELDOUT_NAMESPACE_BEGIN
namespace report {

/// Decimals that show the half-width of [lower, upper] to two significant digits (0..12);
/// 4 when the interval has no width.
inline int interval_decimals(double lower, double upper) {
    if (!std::isfinite(lower) || !std::isfinite(upper))
        detail::fail("heldout::report::interval_decimals", std::isfinite(lower) ? "upper" : "lower", "not finite");
    const double half = std::abs(upper - lower) / 2;
    if (!(half > 0))
        return 4;
    const int magnitude = static_cast<int>(std::floor(std::log10(half)));
    return std::clamp(1 - magnitude, 0, 12);
}

/// x with 4 significant digits, without an exponent for 1e-4 <= |x| < 1e15.
inline std::string significant_text(double x) {
    if (!std::isfinite(x))
        detail::fail("heldout::report::significant_text", "x", "not finite");
    if (x == 0)
        return "0";
    const double a = std::abs(x);
    if (a < 1e-4 || a >= 1e15) {
        char buf[64];
        const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::general, 4);
        HELDOUT_ASSERT(r.ec == std::errc{});
        return std::string(buf, r.ptr);
    }
    const int magnitude = static_cast<int>(std::floor(std::log10(a)));
    return number(x, std::max(0, 3 - magnitude));
}

/// "value [lower, upper]" at the interval's decimals, or the value alone at 4 significant
/// digits when there is no interval.
inline std::string estimate_text(double value, std::optional<double> lower, std::optional<double> upper) {
    if (!lower || !upper)
        return significant_text(value);
    const int d = interval_decimals(*lower, *upper);
    return number(value, d) + " [" + number(*lower, d) + ", " + number(*upper, d) + "]";
}

/// The value alone at the decimals its interval supports (for a table column of its own).
inline std::string value_text(double value, std::optional<double> lower, std::optional<double> upper) {
    if (!lower || !upper)
        return significant_text(value);
    return number(value, interval_decimals(*lower, *upper));
}

/// "[lower, upper]" at its own decimals; "-" without an interval.
inline std::string interval_text(std::optional<double> lower, std::optional<double> upper) {
    if (!lower || !upper)
        return "-";
    const int d = interval_decimals(*lower, *upper);
    return "[" + number(*lower, d) + ", " + number(*upper, d) + "]";
}

/// A p-value for people: "< 0.0001" below 1e-4, else two significant digits ("0.044",
/// "0.31", "1").
inline std::string p_text(double p) {
    if (!(p >= 0 && p <= 1))
        detail::fail("heldout::report::p_text", "p", "must lie in [0, 1]");
    if (p < 1e-4)
        return "< 0.0001";
    if (p >= 0.995)
        return "1";
    const int magnitude = static_cast<int>(std::floor(std::log10(p)));
    return number(p, std::max(2, 1 - magnitude));
}

} // namespace report
HELDOUT_NAMESPACE_END
