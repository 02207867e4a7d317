// heldout/loss/poisson.hpp — the Poisson deviance with a log link: f is the log of the
// predicted mean, mu = exp(f); truth y is a non-negative count (or rate).
//
//   heldout::loss::poisson l;
//   l.value(2.0, std::log(2.0));    // 0 (perfect mean)
//   l.value(0.0, 0.0);              // 2 = 2 mu  (y = 0: y log y is 0)
//   l.derivative(3.0, 0.0);         // -4 = 2 (mu - y)
//   l.second_derivative(3.0, 0.0);  // 2  = 2 mu
//
// Scaling: the unit deviance, d(y, mu) = 2 [y log(y / mu) - (y - mu)] (McCullagh & Nelder
// 1989, Generalized Linear Models, 2nd ed., sec. 2.3), so mean_loss<poisson> is the mean
// Poisson deviance D / n, and half of it is the negative log-likelihood up to a term in
// y alone. Derivatives are taken in the log-mean f. y log y is 0 at y = 0. A negative y is
// outside the domain; mean_loss reports it with its index.
#pragma once

#include <heldout/core/loss.hpp>

#include <cmath>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// Poisson deviance 2 [y log(y/mu) - (y - mu)], mu = exp(f).
struct poisson {
    static constexpr std::string_view name = "Poisson deviance";
    static constexpr std::string_view measure_name = "mean Poisson deviance";
    static constexpr std::string_view truth_domain = "y >= 0";

    double value(double y, double f) const noexcept {
        const double mu = std::exp(f);
        const double ylogy = y > 0 ? y * (std::log(y) - f) : (y == 0 ? 0.0 : std::log(y)); // NaN when y < 0
        return 2.0 * (ylogy - (y - mu));
    }
    double derivative(double y, double f) const noexcept { return 2.0 * (std::exp(f) - y); }
    double second_derivative(double, double f) const noexcept { return 2.0 * std::exp(f); }
};

} // namespace loss
HELDOUT_NAMESPACE_END
