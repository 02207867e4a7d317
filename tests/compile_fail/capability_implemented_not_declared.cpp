// A measure that has row_losses(...) but does not declare cap::row_losses must not compile:
// the methods that need per-row values would otherwise depend on a member's spelling.
// expect: does not declare heldout::cap::row_losses
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <cstddef>
#include <span>
#include <string>

struct mean_gap {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    using prediction = heldout::kinds::real;
    std::string name() const { return "mean gap"; }
    auto accumulator() const { return heldout::measure::mse{}.accumulator(); }
    bool operator==(const mean_gap&) const = default;
    void row_losses(std::span<const double> truth, std::span<const double> prediction, std::span<double> out) const {
        for (std::size_t i = 0; i < out.size(); ++i)
            out[i] = prediction[i] - truth[i];
    }
};

int main() { return heldout::check_measure<mean_gap>() ? 0 : 1; }
