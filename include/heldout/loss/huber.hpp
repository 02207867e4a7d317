// heldout/loss/huber.hpp — Huber's loss: quadratic near zero, linear in the tails.
//
//   heldout::loss::huber l{1.5};    // delta = 1.5
//   l.value(0.0, 1.0);              // 0.5   = e^2 / 2            (|e| <= delta)
//   l.value(0.0, 4.0);              // 4.875 = delta (|e| - delta/2)
//   l.derivative(0.0, 4.0);         // 1.5   = clamp(f - y, -delta, delta)
//
// Huber (1964), "Robust estimation of a location parameter", Ann. Math. Stat. 35:73-101:
// rho(e) = e^2/2 for |e| <= delta, delta (|e| - delta/2) otherwise, with e = y - f. The
// second derivative is 1 inside [-delta, delta] (the boundary included) and 0 outside.
// delta must be positive and finite: mean_loss checks it (validate()).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/loss.hpp>

#include <cmath>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// Huber's loss with threshold delta.
struct huber {
    static constexpr std::string_view name = "Huber";
    static constexpr bool propagates_non_finite = true; // a NaN or inf input gives a non-finite value

    double delta = 1.0;

    bool operator==(const huber&) const = default;
    /// The parameter for printed names ("delta 1.5").
    std::string parameters_text() const { return "delta " + detail::number_text(delta); }

    /// The parameter, for serialised accumulator state.
    template <class F>
    void visit_state(F&& f) {
        f(delta);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(delta);
    }

    double value(double y, double f) const noexcept {
        const double e = y - f;
        const double a = std::fabs(e);
        const double quadratic = 0.5 * e * e, linear = delta * (a - 0.5 * delta); // both, then select: vectorises
        return a <= delta ? quadratic : linear;
    }
    constexpr double derivative(double y, double f) const noexcept {
        const double d = f - y;
        return d > delta ? delta : (d < -delta ? -delta : d);
    }
    constexpr double second_derivative(double y, double f) const noexcept {
        const double d = f - y;
        return (d <= delta && d >= -delta) ? 1.0 : 0.0;
    }
    /// Throws input_error unless delta is positive and finite.
    void validate(std::string_view who) const {
        if (!(delta > 0) || !std::isfinite(delta))
            detail::fail(who, "delta", "must be positive and finite, got " + detail::number_text(delta));
    }
};

} // namespace loss
HELDOUT_NAMESPACE_END
