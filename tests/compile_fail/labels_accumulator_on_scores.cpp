// An accumulator of a label measure refuses float scores at its add() (a concept error).
// expect: label_range
#include <heldout/measure/precision_recall.hpp>

#include <vector>

int main() {
    std::vector<int> truth{0, 1};
    std::vector<float> scores{0.2f, 0.9f};
    auto acc = heldout::measure::f_beta{1.0}.accumulator();
    acc.add(truth, scores);
    return static_cast<int>(acc.count());
}
