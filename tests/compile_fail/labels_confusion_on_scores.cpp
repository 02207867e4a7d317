// A confusion matrix of real-valued scores must not compile (no implicit threshold).
// expect: this measure scores class labels
#include <heldout/measure/confusion_matrix.hpp>

#include <vector>

int main() {
    std::vector<int> truth{0, 1};
    std::vector<double> scores{0.2, 0.9};
    return static_cast<int>(heldout::evaluate(heldout::measure::confusion_matrix{}, truth, scores, truth).size());
}
