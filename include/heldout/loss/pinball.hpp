// heldout/loss/pinball.hpp — the pinball (quantile) loss: its mean is minimised by the
// tau-quantile, so mean_loss<pinball> scores quantile predictions.
//
//   heldout::loss::pinball l{0.9};  // tau = 0.9
//   l.value(3.0, 2.0);              // 0.9 = tau e,        e = y - f = 1  (under-prediction)
//   l.value(2.0, 3.0);              // 0.1 = (tau - 1) e,  e = -1         (over-prediction)
//   l.derivative(3.0, 2.0);         // -0.9
//
// Koenker & Bassett (1978), "Regression quantiles", Econometrica 46:33-50:
// rho_tau(e) = max(tau e, (tau - 1) e) with e = y - f. Its derivative in f is -tau where
// f < y and 1 - tau where f > y; at the kink f = y we return the subgradient 0 (inside
// [-tau, 1 - tau]). Second derivative 0. tau = 0.5 gives half the absolute error.
// tau must lie in (0, 1): mean_loss checks it (validate()).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/loss.hpp>

#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// The pinball loss of quantile level tau.
struct pinball {
    static constexpr std::string_view name = "pinball";
    static constexpr bool propagates_non_finite = true; // a NaN or inf input gives a non-finite value

    double tau = 0.5;

    bool operator==(const pinball&) const = default;
    /// The parameter for printed names ("tau 1.5").
    std::string parameters_text() const { return "tau " + detail::number_text(tau); }

    /// The parameter, for serialised accumulator state.
    template <class F>
    void visit_state(F&& f) {
        f(tau);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(tau);
    }

    constexpr double value(double y, double f) const noexcept {
        const double e = y - f;
        const double under = tau * e, over = (tau - 1.0) * e; // both, then select: vectorises
        return e >= 0 ? under : over;
    }
    constexpr double derivative(double y, double f) const noexcept { return f < y ? -tau : (f > y ? 1.0 - tau : 0.0); }
    constexpr double second_derivative(double, double) const noexcept { return 0.0; }
    /// Throws input_error unless 0 < tau < 1.
    void validate(std::string_view who) const {
        if (!(tau > 0 && tau < 1))
            detail::fail(who, "tau", "quantile level must lie in (0, 1), got " + detail::number_text(tau));
    }
};

} // namespace loss
HELDOUT_NAMESPACE_END
