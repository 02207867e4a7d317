// The multiclass cross-entropy fed a flat vector instead of class-probability rows must not
// compile: the number of classes would be a guess; pass an Eigen matrix or heldout::rows(flat, k).
// expect: needs class-probability rows
#include <heldout/measure/cross_entropy.hpp>

#include <vector>

int main() {
    std::vector<int> y{0, 2};
    std::vector<double> flat{0.5, 0.3, 0.2, 0.1, 0.1, 0.8};
    return static_cast<int>(heldout::evaluate(heldout::measure::multiclass_cross_entropy{}, y, flat));
}
