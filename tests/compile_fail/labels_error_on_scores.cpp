// A label measure fed float scores must not compile: scores become labels only through an
// explicit threshold (heldout::labels_at).
// expect: this measure scores class labels
#include <heldout/measure/classification_error.hpp>

#include <vector>

int main() {
    std::vector<int> truth{0, 1};
    std::vector<float> scores{0.2f, 0.9f};
    return static_cast<int>(heldout::evaluate(heldout::measure::classification_error{}, truth, scores));
}
