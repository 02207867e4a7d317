// heldout/loss/squared.hpp — squared error, the loss behind MSE.
//
//   heldout::loss::squared l;
//   l.value(2.0, 1.5);              // 0.25  = (y - f)^2
//   l.derivative(2.0, 1.5);         // -1.0  = 2 (f - y)
//   l.second_derivative(2.0, 1.5);  // 2.0
#pragma once

#include <heldout/core/loss.hpp>

#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// (y - f)^2.
struct squared {
    static constexpr std::string_view name = "squared";
    static constexpr bool propagates_non_finite = true; // a NaN or inf input gives a non-finite value
    static constexpr std::string_view measure_name = "MSE";

    constexpr double value(double y, double f) const noexcept {
        const double e = y - f;
        return e * e;
    }
    constexpr double derivative(double y, double f) const noexcept { return 2.0 * (f - y); }
    constexpr double second_derivative(double, double) const noexcept { return 2.0; }
};

} // namespace loss
HELDOUT_NAMESPACE_END
