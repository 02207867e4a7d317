// The 0-1 loss has no derivative, so it must not pass where a differentiable loss is
// required (a learner's inner loss): it is a pointwise_loss only.
// expect: differentiable_loss
#include <heldout/loss/zero_one.hpp>

template <heldout::differentiable_loss L>
double gradient(const L& l, double y, double f) {
    return l.derivative(y, f);
}

int main() { return static_cast<int>(gradient(heldout::loss::zero_one{}, 1.0, 0.5)); }
