// heldout/censored/censoring_estimate.hpp — the one Kaplan–Meier estimate of the censoring
// distribution that every censored measure weights by.
//
//   heldout::censoring_estimate g(heldout::censored(time, event));
//   double at = g.at(4.0);        // G(4)  = estimated P(C > 4)
//   double before = g.before(4.0); // G(4-) = estimated P(C >= 4)
//
// G is the Kaplan–Meier product over the distinct censoring times s,
//   G(t) = prod_{s <= t} (1 - c_s / (n_s - d_s)),
// with n_s the rows whose time is >= s, d_s the events and c_s the censorings at s: at a time
// with both, the events leave the risk set before the censorings (R survival's concordance
// does so; survfit(Surv(time, 1 - event) ~ 1) keeps the events in, so the two differ exactly
// at such ties). Event rows read G(T-) (the left limit), rows still at risk at t read G(t).
// The weights 1/G assume censoring independent of the event time (docs/censored.md).
#pragma once

#include <heldout/censored/truth.hpp>

#include <algorithm>
#include <cstddef>
#include <numeric>
#include <span>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Kaplan–Meier estimate of the censoring survival function G(t) = P(C > t).
class censoring_estimate {
public:
    censoring_estimate() = default;

    /// From a censored truth (checked: time finite >= 0, event 0/1).
    template <class T, class E>
    explicit censoring_estimate(const censored_times<T, E>& y, std::string_view who = "heldout::censoring_estimate") {
        std::vector<double> t(y.size());
        std::vector<std::uint8_t> e(y.size());
        for (std::size_t i = 0; i < y.size(); ++i) {
            detail::check_censored_row(who, y.time[i], y.event[i], i);
            t[i] = static_cast<double>(y.time[i]);
            e[i] = static_cast<std::uint8_t>(y.event[i] != E(0));
        }
        build(t, e);
    }

    /// From checked rows (time, event 0/1).
    void build(std::span<const double> time, std::span<const std::uint8_t> event) {
        times_.clear();
        after_.clear();
        const std::size_t n = time.size();
        std::vector<std::size_t> order(n);
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return time[a] < time[b]; });
        double g = 1.0;
        std::size_t at_risk = n;
        for (std::size_t k = 0; k < n;) {
            const double s = time[order[k]];
            std::size_t d = 0, c = 0;
            for (; k < n && time[order[k]] == s; ++k)
                (event[order[k]] ? d : c) += 1;
            if (c > 0) {
                // events at s leave first: the censorings face n_s - d_s rows
                g *= 1.0 - static_cast<double>(c) / static_cast<double>(at_risk - d);
                times_.push_back(s);
                after_.push_back(g);
            }
            at_risk -= d + c;
        }
    }

    /// G(t): estimated P(C > t) (right-continuous).
    double at(double t) const noexcept {
        const auto it = std::upper_bound(times_.begin(), times_.end(), t);
        return it == times_.begin() ? 1.0 : after_[static_cast<std::size_t>(it - times_.begin()) - 1];
    }
    /// G(t-): the left limit, estimated P(C >= t).
    double before(double t) const noexcept {
        const auto it = std::lower_bound(times_.begin(), times_.end(), t);
        return it == times_.begin() ? 1.0 : after_[static_cast<std::size_t>(it - times_.begin()) - 1];
    }
    /// The distinct censoring times, ascending, and G just after each.
    std::span<const double> jump_times() const noexcept { return times_; }
    std::span<const double> values() const noexcept { return after_; }

private:
    std::vector<double> times_;
    std::vector<double> after_;
};

HELDOUT_NAMESPACE_END
