// The Brier score fed integer class labels as predictions must not compile: it scores
// probabilities P(y = 1), which are floating point (real_range); labels are not probabilities.
// expect: needs floating-point predictions
#include <heldout/measure/brier_score.hpp>

#include <vector>

int main() {
    std::vector<int> y{1, 0};
    std::vector<int> predicted{1, 1};
    return static_cast<int>(heldout::evaluate(heldout::measure::brier_score{}, y, predicted));
}
