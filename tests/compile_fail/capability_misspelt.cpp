// A measure that misspells a capability must not compile (never a feature silently off):
// heldout::cap holds only the capabilities that exist, so `cap::row_loss` names nothing.
// expect: row_loss.+(is not a member|in namespace)
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/traits.hpp>

#include <span>
#include <string>
#include <vector>

struct mean_gap {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    using prediction = heldout::kinds::real;
    using capabilities = heldout::offers<heldout::cap::row_loss>; // misspelt: cap::row_losses
    std::string name() const { return "mean gap"; }
};

int main() { return heldout::offers_v<mean_gap, heldout::cap::row_losses> ? 1 : 0; }
