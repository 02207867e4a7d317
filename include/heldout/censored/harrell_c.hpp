// heldout/censored/harrell_c.hpp — Harrell's concordance index of a risk score against
// censored event times.
//
//   auto truth = heldout::censored(time, event);       // event: 1 = seen, 0 = censored
//   double c = heldout::evaluate(heldout::measure::harrell_c{}, truth, risk);  // higher risk = earlier
//   auto acc = heldout::measure::harrell_c{}.accumulator();
//   acc.add(truth, risk);  other.merge(acc);           // exact: the state keeps the rows
//
// C = (concordant + tied / 2) / comparable over the comparable pairs (i, j): i an event and
// T_i < T_j, or T_i == T_j with j censored (the censored row counts as later); two events at
// one time are not comparable. Concordant: r_i > r_j; tied in risk: r_i == r_j (-0.0 == 0.0)
// counts one half (Harrell et al. 1982; docs/censored.md). O(n log n): a Fenwick tree over
// score ranks.
//
// Errors: time NaN/inf/negative, event not 0/1, risk NaN/inf, sizes differing -> input_error
// naming the row; no event at all -> input_error on `event`; no comparable pair ->
// undefined_error.
#pragma once

#include <heldout/censored/detail/censored_accumulator.hpp>
#include <heldout/censored/detail/common.hpp>
#include <heldout/censored/detail/concordance_counts.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>

#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Harrell's C: the share of comparable pairs that the risk score orders correctly.
struct harrell_c {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::score;
    using truth = kinds::censored;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "harrell_c";

    std::string name() const { return "Harrell's C"; }
    bool operator==(const harrell_c&) const = default;
    detail::censored_accumulator<harrell_c> accumulator() const {
        return detail::censored_accumulator<harrell_c>(*this);
    }

    // --- used by the accumulator ---
    std::size_t width() const noexcept { return 1; }
    void check_prediction(double r, std::size_t row) const { detail::check_finite_risk(name(), r, row); }
    /// Each event row's pair weight (1), or 0.
    std::vector<double> pair_weights(std::span<const double>, std::span<const std::uint8_t> event) const {
        std::vector<double> u(event.size());
        for (std::size_t i = 0; i < u.size(); ++i)
            u[i] = event[i] ? 1.0 : 0.0;
        return u;
    }
    double from_rows(std::span<const double> time, std::span<const std::uint8_t> event,
                     std::span<const double> risk) const {
        detail::require_event(name(), event);
        const auto c = detail::count_concordance(time, event, risk, pair_weights(time, event), false);
        if (!(c.comparable() > 0))
            detail::fail_undefined(name(), "no comparable pair (every event ties with every later time)");
        return c.value();
    }
    template <class F>
    void visit_state(F&&) const noexcept {}
    template <class F>
    void visit_state(F&&) noexcept {}
};

} // namespace measure
HELDOUT_NAMESPACE_END
