// heldout/censored/detail/common.hpp — checks shared by the censored measures (internal).
#pragma once

#include <heldout/core/error.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

inline void check_finite_risk(std::string_view who, double r, std::size_t row) {
    if (std::isnan(r))
        fail_at(who, "risk", "NaN", row);
    if (!std::isfinite(r))
        fail_at(who, "risk", "not finite", row);
}

inline void check_survival_probability(std::string_view who, double p, std::size_t row) {
    if (std::isnan(p))
        fail_at(who, "prediction", "NaN", row);
    if (p < 0 || p > 1)
        fail_at(who, "prediction", "survival probability outside [0, 1] (" + number_text(p) + ")", row);
}

/// A measure that needs an event refuses a truth without any (input_error on `event`).
inline void require_event(std::string_view who, std::span<const std::uint8_t> event) {
    for (const auto e : event)
        if (e)
            return;
    fail(who, "event", "no event at all (every row is censored)");
}

inline void check_time_parameter(std::string_view who, std::string_view arg, double t) {
    if (std::isnan(t))
        fail(who, arg, "NaN");
    if (t < 0)
        fail(who, arg, "negative (" + number_text(t) + ")");
}

} // namespace detail
HELDOUT_NAMESPACE_END
