// heldout/censored/auc_at.hpp — cumulative/dynamic time-dependent ROC AUC at a time t with
// inverse probability of censoring weights.
//
//   double a = heldout::evaluate(heldout::measure::auc_at{.time = 3.0}, heldout::censored(time, event), risk);
//
// Cases: events by t (T_i <= t, event 1), each weighing 1 / G(T_i-); controls: rows still
// event-free after t (T_j > t), each weighing 1 / G(t), a constant that cancels. Rows censored
// by t are neither. AUC(t) = sum_i sum_j w_i [I(r_i > r_j) + I(r_i == r_j) / 2] / (sum_i w_i
// * #controls) (Heagerty & Zheng 2005 for the cumulative/dynamic definition; Uno et al. 2007
// for the IPCW estimator), G the censoring estimate of censoring_estimate.hpp. O(n log n).
//
// Errors: as harrell_c; time NaN or negative -> input_error; no case or no control at t ->
// undefined_error naming which.
#pragma once

#include <heldout/censored/censoring_estimate.hpp>
#include <heldout/censored/detail/censored_accumulator.hpp>
#include <heldout/censored/detail/common.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/detail/sum.hpp>

#include <algorithm>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Time-dependent AUC at `time` (cumulative cases, dynamic controls, IPCW).
struct auc_at {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::score;
    using truth = kinds::censored;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "auc_at";

    double time = 0;

    std::string name() const { return "AUC at time " + detail::number_text(time); }
    bool operator==(const auc_at&) const = default;
    detail::censored_accumulator<auc_at> accumulator() const {
        detail::check_time_parameter(name(), "time", time);
        return detail::censored_accumulator<auc_at>(*this);
    }

    std::size_t width() const noexcept { return 1; }
    void check_prediction(double r, std::size_t row) const { detail::check_finite_risk(name(), r, row); }
    double from_rows(std::span<const double> t, std::span<const std::uint8_t> event,
                     std::span<const double> risk) const {
        detail::check_time_parameter(name(), "time", time);
        detail::require_event(name(), event);
        std::vector<double> controls;
        for (std::size_t j = 0; j < t.size(); ++j)
            if (t[j] > time)
                controls.push_back(risk[j]);
        std::sort(controls.begin(), controls.end());
        censoring_estimate g;
        g.build(t, event);
        detail::compensated_sum num, den;
        bool any_case = false;
        for (std::size_t i = 0; i < t.size(); ++i) {
            if (!(event[i] && t[i] <= time))
                continue;
            const double w = 1.0 / g.before(t[i]);
            const auto lo = std::lower_bound(controls.begin(), controls.end(), risk[i]);
            const auto hi = std::upper_bound(lo, controls.end(), risk[i]);
            const double below = static_cast<double>(lo - controls.begin());
            const double tied = static_cast<double>(hi - lo);
            num.add(w * (below + 0.5 * tied));
            den.add(w);
            any_case = true;
        }
        if (!any_case)
            detail::fail_undefined(name(), "no case: no event at or before the time");
        if (controls.empty())
            detail::fail_undefined(name(), "no control: no row is observed beyond the time");
        return num.value() / (den.value() * static_cast<double>(controls.size()));
    }
    template <class F>
    void visit_state(F&& f) const {
        f(time);
    }
    template <class F>
    void visit_state(F&& f) {
        f(time);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
