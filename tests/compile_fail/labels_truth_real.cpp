// A label measure with real-valued truth must not compile: truth holds classes 0..k-1.
// expect: cannot score this truth/prediction pairing
#include <heldout/measure/mcc.hpp>

#include <vector>

int main() {
    std::vector<double> truth{0.0, 1.0};
    std::vector<int> labels{0, 1};
    return static_cast<int>(heldout::evaluate(heldout::measure::mcc{}, truth, labels));
}
