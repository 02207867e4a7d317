// heldout/loss/absolute.hpp — absolute error, the loss behind MAE.
//
//   heldout::loss::absolute l;
//   l.value(2.0, 1.5);              // 0.5  = |y - f|
//   l.derivative(2.0, 1.5);         // -1.0 = sign(f - y)
//   l.second_derivative(2.0, 1.5);  // 0.0
//
// At the kink f = y the derivative is the subgradient 0 (the middle of [-1, 1]), so a
// learner stepping along it stays put at an exact fit.
#pragma once

#include <heldout/core/loss.hpp>

#include <cmath>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// |y - f|.
struct absolute {
    static constexpr std::string_view name = "absolute";
    static constexpr bool propagates_non_finite = true; // a NaN or inf input gives a non-finite value
    static constexpr std::string_view measure_name = "MAE";

    double value(double y, double f) const noexcept { return std::fabs(y - f); } // fabs: a bit mask, vectorises
    constexpr double derivative(double y, double f) const noexcept { return f > y ? 1.0 : (f < y ? -1.0 : 0.0); }
    constexpr double second_derivative(double, double) const noexcept { return 0.0; }
};

} // namespace loss
HELDOUT_NAMESPACE_END
