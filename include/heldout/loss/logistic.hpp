// heldout/loss/logistic.hpp — binary cross-entropy on the logit scale (the logistic loss).
//
//   heldout::loss::logistic l;      // truth y in {0, 1}, prediction f = log(p / (1 - p))
//   l.value(1.0, 0.0);              // 0.693147... = log 2
//   l.value(0.0, 1000.0);           // 1000 (no overflow)
//   l.derivative(1.0, 0.0);         // -0.5 = sigmoid(f) - y
//   l.second_derivative(1.0, 0.0);  // 0.25 = sigmoid(f) (1 - sigmoid(f))
//
// value = log(1 + e^f) - y f = -[y log p + (1 - y) log(1 - p)] with p = sigmoid(f),
// evaluated as max(f, 0) - y f + log1p(exp(-|f|)): exp never overflows and, for y in
// {0, 1}, max(f, 0) - y f is exact, so |f| up to 1e3 (and beyond) keeps full accuracy.
// The derivatives use sigmoid(f) computed from exp(-|f|) for the same reason.
#pragma once

#include <heldout/core/loss.hpp>

#include <cmath>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// Logistic loss: y in {0, 1}, f a logit.
struct logistic {
    static constexpr std::string_view name = "logistic";
    static constexpr truth_kind truth = truth_kind::binary;

    double value(double y, double f) const noexcept {
        const double a = f < 0 ? -f : f;
        return (f > 0 ? f : 0.0) - y * f + std::log1p(std::exp(-a));
    }
    double derivative(double y, double f) const noexcept { return sigmoid(f) - y; }
    double second_derivative(double, double f) const noexcept {
        const double a = f < 0 ? -f : f;
        const double e = std::exp(-a); // sigmoid(f)(1 - sigmoid(f)) = e / (1 + e)^2, symmetric in f
        const double d = 1.0 + e;
        return e / (d * d);
    }
    /// 1 / (1 + e^-f) without overflow.
    static double sigmoid(double f) noexcept {
        if (f >= 0)
            return 1.0 / (1.0 + std::exp(-f));
        const double e = std::exp(f);
        return e / (1.0 + e);
    }
};

} // namespace loss
HELDOUT_NAMESPACE_END
