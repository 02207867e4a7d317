// heldout/censored/brier.hpp — the Brier score of predicted survival probabilities under
// censoring (IPCW, Graf et al. 1999): at one time, and integrated over a time grid.
//
//   auto truth = heldout::censored(time, event);
//   double b = heldout::evaluate(heldout::measure::brier_at{.time = 2.0}, truth, surv_at_2);
//   std::vector<double> curves = ...;                  // n rows x 3 columns, row-major: S(t_k | x_i)
//   double ibs = heldout::evaluate(heldout::measure::brier_over{.times = {1, 2, 4}}, truth,
//                                  heldout::rows(curves, 3));
//
// BS(t) = (1/n) sum_i [ S_i^2 I(T_i <= t, event_i = 1) / G(T_i-) + (1 - S_i)^2 I(T_i > t) / G(t) ]
// with S_i = S(t | x_i) the predicted probability of being event-free at t and G the censoring
// estimate of censoring_estimate.hpp from the same rows. Rows censored by t weigh 0 but count in
// n (../docs/censored.md). brier_over: BS at each grid time t_1 < ... < t_k (k >= 2), integrated
// by the trapezoid rule and divided by t_k - t_1 (the integrated Brier score).
//
// Errors: as harrell_c (a prediction outside [0, 1] or NaN names the row); time or grid NaN,
// negative, grid not strictly increasing or shorter than 2 -> input_error.
#pragma once

#include <heldout/censored/censoring_estimate.hpp>
#include <heldout/censored/detail/censored_accumulator.hpp>
#include <heldout/censored/detail/common.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/detail/sum.hpp>

#include <cstddef>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {
/// BS(t) of column `col` of a row-major prediction with `width` columns.
inline double brier_at_time(const censoring_estimate& g, double t, std::span<const double> time,
                            std::span<const std::uint8_t> event, std::span<const double> pred, std::size_t width,
                            std::size_t col) {
    const double g_t = g.at(t);
    compensated_sum s;
    for (std::size_t i = 0; i < time.size(); ++i) {
        const double p = pred[i * width + col];
        if (time[i] > t)
            s.add((1 - p) * (1 - p) / g_t); // g_t > 0: row i is still at risk after t
        else if (event[i])
            s.add(p * p / g.before(time[i]));
    }
    return s.value() / static_cast<double>(time.size());
}
} // namespace detail

namespace measure {

/// IPCW Brier score at `time` of predicted survival probabilities S(time | x).
struct brier_at {
    static constexpr direction better = direction::lower_is_better;
    using prediction = kinds::survival_probability;
    using truth = kinds::censored;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "brier_at";

    double time = 0;

    std::string name() const { return "Brier score at time " + detail::number_text(time); }
    bool operator==(const brier_at&) const = default;
    detail::censored_accumulator<brier_at> accumulator() const {
        detail::check_time_parameter(name(), "time", time);
        return detail::censored_accumulator<brier_at>(*this);
    }

    std::size_t width() const noexcept { return 1; }
    void check_prediction(double p, std::size_t row) const { detail::check_survival_probability(name(), p, row); }
    double from_rows(std::span<const double> t, std::span<const std::uint8_t> event,
                     std::span<const double> pred) const {
        detail::check_time_parameter(name(), "time", time);
        censoring_estimate g;
        g.build(t, event);
        return detail::brier_at_time(g, time, t, event, pred, 1, 0);
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

/// Integrated IPCW Brier score over the grid `times` of predicted survival curves (one row per
/// observation, one column per grid time).
struct brier_over {
    static constexpr direction better = direction::lower_is_better;
    using prediction = kinds::survival_curves;
    using truth = kinds::censored;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "brier_over";

    std::vector<double> times;

    std::string name() const {
        if (times.empty())
            return "integrated Brier score";
        return "integrated Brier score over [" + detail::number_text(times.front()) + ", " +
               detail::number_text(times.back()) + "]";
    }
    bool operator==(const brier_over&) const = default;
    detail::censored_accumulator<brier_over> accumulator() const {
        check_grid();
        return detail::censored_accumulator<brier_over>(*this);
    }

    void check_grid() const {
        const std::string who = name();
        if (times.size() < 2)
            detail::fail(who, "times", "needs at least 2 grid times, got " + std::to_string(times.size()));
        for (std::size_t k = 0; k < times.size(); ++k) {
            if (std::isnan(times[k]) || !std::isfinite(times[k]))
                detail::fail_at(who, "times", "not finite", k);
            if (times[k] < 0)
                detail::fail_at(who, "times", "negative", k);
            if (k > 0 && !(times[k] > times[k - 1]))
                detail::fail_at(who, "times", "not strictly increasing", k);
        }
    }
    std::size_t width() const noexcept { return times.size(); }
    void check_prediction(double p, std::size_t row) const { detail::check_survival_probability(name(), p, row); }
    double from_rows(std::span<const double> t, std::span<const std::uint8_t> event,
                     std::span<const double> pred) const {
        check_grid();
        censoring_estimate g;
        g.build(t, event);
        const std::size_t k = times.size();
        double prev = detail::brier_at_time(g, times[0], t, event, pred, k, 0);
        detail::compensated_sum area;
        for (std::size_t c = 1; c < k; ++c) {
            const double cur = detail::brier_at_time(g, times[c], t, event, pred, k, c);
            area.add(0.5 * (prev + cur) * (times[c] - times[c - 1]));
            prev = cur;
        }
        return area.value() / (times.back() - times.front());
    }
    template <class F>
    void visit_state(F&& f) const {
        f(times);
    }
    template <class F>
    void visit_state(F&& f) {
        f(times);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
