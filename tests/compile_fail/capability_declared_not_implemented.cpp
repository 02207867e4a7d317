// A measure that declares cap::row_losses without the member it promises must not compile,
// with a message naming the missing member.
// expect: declares cap::row_losses but has no
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <string>

struct mean_gap {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    using prediction = heldout::kinds::real;
    using capabilities = heldout::offers<heldout::cap::row_losses>; // but no row_losses(...) below
    std::string name() const { return "mean gap"; }
    auto accumulator() const { return heldout::measure::mse{}.accumulator(); }
    bool operator==(const mean_gap&) const = default;
};

int main() { return heldout::check_measure<mean_gap>() ? 0 : 1; }
