// heldout/loss/hinge.hpp — the hinge loss of margin classifiers (support vector machines).
//
//   heldout::loss::hinge l;         // truth y in {0, 1}, mapped to s = 2y - 1 in {-1, +1}
//   l.value(1.0, 0.25);             // 0.75 = max(0, 1 - s f)
//   l.value(0.0, -2.0);             // 0
//   l.derivative(1.0, 0.25);        // -1 = -s where s f < 1
//
// value = max(0, 1 - s f), s = 2y - 1 (so truth 0 is the negative class, -1). The
// derivative is -s where s f < 1 and 0 where s f > 1; at the kink s f = 1 we return the
// subgradient 0 (the end of [-s, 0] at which a learner stops). Second derivative 0.
#pragma once

#include <heldout/core/loss.hpp>

#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// Hinge loss: y in {0, 1} (as -1, +1), f a real score.
struct hinge {
    static constexpr std::string_view name = "hinge";
    static constexpr truth_kind truth = truth_kind::binary;

    constexpr double value(double y, double f) const noexcept {
        const double m = 1.0 - (2.0 * y - 1.0) * f;
        return m > 0 ? m : 0.0;
    }
    constexpr double derivative(double y, double f) const noexcept {
        const double s = 2.0 * y - 1.0;
        return s * f < 1.0 ? -s : 0.0;
    }
    constexpr double second_derivative(double, double) const noexcept { return 0.0; }
};

} // namespace loss
HELDOUT_NAMESPACE_END
