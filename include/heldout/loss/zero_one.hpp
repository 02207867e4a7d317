// heldout/loss/zero_one.hpp — the 0-1 loss of a real score against a 0/1 truth.
//
//   heldout::loss::zero_one l;          // threshold 0: predicts 1 where f >= 0 (logits, margins)
//   l.value(1.0, 0.3);                  // 0 (right)
//   l.value(0.0, 0.3);                  // 1 (wrong)
//   heldout::loss::zero_one half{0.5};  // for probabilities: predicts 1 where f >= 0.5
//
// value = 1 if the predicted class [f >= threshold] differs from y, else 0. The score
// becomes a class only through this explicit threshold (the same rule as
// heldout::labels_at). A step function has no useful derivative, so zero_one is a
// pointwise_loss but not a differentiable_loss: learners use logistic or hinge instead.
// For class labels use the label measures (classification error).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/loss.hpp>

#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace loss {

/// 0-1 loss: y in {0, 1}, predicted class 1 where f >= threshold.
struct zero_one {
    static constexpr std::string_view name = "0-1";
    static constexpr truth_kind truth = truth_kind::binary;

    double threshold = 0.0;

    bool operator==(const zero_one&) const = default;
    /// The parameter for printed names ("threshold 1.5").
    std::string parameters_text() const { return "threshold " + detail::number_text(threshold); }

    /// The parameter, for serialised accumulator state.
    template <class F>
    void visit_state(F&& f) {
        f(threshold);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(threshold);
    }

    constexpr double value(double y, double f) const noexcept {
        const double predicted = f >= threshold ? 1.0 : 0.0;
        return predicted == y ? 0.0 : 1.0;
    }
};

} // namespace loss
HELDOUT_NAMESPACE_END
