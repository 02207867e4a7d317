// heldout/censored/uno_c.hpp — Uno's concordance: Harrell's comparable pairs weighted by the
// inverse squared censoring survival, so that the value does not depend on the censoring
// distribution (Uno et al. 2011), up to a horizon.
//
//   double c = heldout::evaluate(heldout::measure::uno_c{.horizon = 5.0}, heldout::censored(time, event), risk);
//
// C_tau = sum_{i,j} u_i [I(r_i > r_j) + I(r_i == r_j) / 2] / sum_{i,j} u_i over the comparable
// pairs of harrell_c.hpp whose earlier row has T_i <= tau, with u_i = G(T_i-)^-2 and G the
// Kaplan–Meier censoring estimate of censoring_estimate.hpp, computed from the same rows.
// horizon defaults to +inf (every event). R survival: concordance(..., timewt = "n/G2",
// ymax = tau, reverse = TRUE) computes the same value. The weights assume censoring
// independent of the event time.
//
// Errors: as harrell_c; horizon NaN or negative -> input_error; no comparable pair up to the
// horizon -> undefined_error.
#pragma once

#include <heldout/censored/censoring_estimate.hpp>
#include <heldout/censored/detail/censored_accumulator.hpp>
#include <heldout/censored/detail/common.hpp>
#include <heldout/censored/detail/concordance_counts.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>

#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Uno's C up to `horizon` (IPCW weights G(T-)^-2).
struct uno_c {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::score;
    using truth = kinds::censored;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "uno_c";

    double horizon = std::numeric_limits<double>::infinity();

    std::string name() const {
        return horizon == std::numeric_limits<double>::infinity()
                   ? std::string("Uno's C")
                   : "Uno's C (horizon " + detail::number_text(horizon) + ")";
    }
    bool operator==(const uno_c&) const = default;
    detail::censored_accumulator<uno_c> accumulator() const {
        detail::check_time_parameter(name(), "horizon", horizon);
        return detail::censored_accumulator<uno_c>(*this);
    }

    std::size_t width() const noexcept { return 1; }
    void check_prediction(double r, std::size_t row) const { detail::check_finite_risk(name(), r, row); }
    std::vector<double> pair_weights(std::span<const double> time, std::span<const std::uint8_t> event) const {
        censoring_estimate g;
        g.build(time, event);
        std::vector<double> u(event.size(), 0.0);
        for (std::size_t i = 0; i < u.size(); ++i)
            if (event[i] && time[i] <= horizon) {
                const double gi = g.before(time[i]); // > 0: row i is still at risk
                u[i] = 1.0 / (gi * gi);
            }
        return u;
    }
    double from_rows(std::span<const double> time, std::span<const std::uint8_t> event,
                     std::span<const double> risk) const {
        detail::check_time_parameter(name(), "horizon", horizon);
        detail::require_event(name(), event);
        const auto c = detail::count_concordance(time, event, risk, pair_weights(time, event), false);
        if (!(c.comparable() > 0))
            detail::fail_undefined(name(), "no comparable pair with an event up to the horizon");
        return c.value();
    }
    template <class F>
    void visit_state(F&& f) const {
        f(horizon);
    }
    template <class F>
    void visit_state(F&& f) {
        f(horizon);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
