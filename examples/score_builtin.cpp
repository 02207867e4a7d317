// Scores a small built-in set of predictions: the first thing the README's demo command
// runs until the full demo lands. The data are invented for the demo (a pump's measured
// and predicted bearing temperatures, degrees C), generated here, not read from anywhere.
#include <heldout/heldout.hpp>

#include <cstdio>
#include <vector>

int main() {
    const std::vector<double> measured{61.2, 63.0, 64.8, 70.1, 66.4, 62.9, 68.3, 71.7};
    const std::vector<double> predicted{60.5, 63.9, 65.0, 68.2, 66.0, 63.5, 69.9, 70.2};
    const double mse = heldout::evaluate(heldout::measure::mse{}, measured, predicted);
    std::printf("MSE of the built-in predictions: %.4f (degrees C squared)\n", mse);
    return 0;
}
