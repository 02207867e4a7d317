// A regression measure given integer class labels as predictions must not compile:
// predictions of a real-valued measure are floating point (real_range).
// expect: needs floating-point predictions
#include <heldout/measure/mean_loss.hpp>

#include <vector>

int main() {
    std::vector<double> y{1.0, 2.0};
    std::vector<int> labels{1, 2};
    return static_cast<int>(heldout::evaluate(heldout::measure::mse{}, y, labels));
}
