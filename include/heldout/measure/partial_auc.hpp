// heldout/measure/partial_auc.hpp — the area under the ROC curve over a false-positive-rate
// range [a, b], optionally standardised as McClish (1989) proposed.
//
//   heldout::measure::partial_auc low_fpr{.fpr_low = 0, .fpr_high = 0.1};
//   double p = heldout::evaluate(low_fpr, truth, scores);            // in [0, 0.1]
//   heldout::measure::partial_auc s{.fpr_low = 0, .fpr_high = 0.1, .standardized = true};
//   double q = heldout::evaluate(s, truth, scores);                  // 0.5 = chance, 1 = perfect
//
// The curve is the empirical ROC of roc_points (tied scores joined by straight segments, so
// [0, 1] gives exactly measure::auc); pAUC = integral over FPR from a to b of TPR, with the curve
// interpolated linearly at a and b (a vertical step at a or b adds no area, so which TPR the
// step has there does not matter).
// McClish standardisation (McClish 1989, Medical Decision Making 9:190-195):
//   pAUC_std = (1 + (pAUC - min) / (max - min)) / 2,  min = (b^2 - a^2) / 2 (the chance diagonal),
//   max = b - a (a perfect test),
// so 0.5 is chance and 1 perfect over the range (below 0.5 when the curve is under the diagonal).
// Parameters: 0 <= a < b <= 1 (input_error otherwise). Undefined when a class is absent.
// Weights as measure::auc.
#pragma once

#include <heldout/measure/auc.hpp>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

struct partial_auc;

namespace detail_pauc {

inline void check_range(std::string_view who, double a, double b) {
    if (!(a >= 0 && a <= 1))
        detail::fail(who, "fpr_low", "must lie in [0, 1], got " + detail::number_text(a));
    if (!(b >= 0 && b <= 1))
        detail::fail(who, "fpr_high", "must lie in [0, 1], got " + detail::number_text(b));
    if (!(a < b))
        detail::fail(who, "fpr_high",
                     "must exceed fpr_low (" + detail::number_text(a) + "), got " + detail::number_text(b));
}

/// Area under the ROC curve of the groups between FPR a and b.
inline double area(const std::vector<detail::tie_group>& g, std::string_view who, bool weighted, double a, double b) {
    const detail::weighted_rank_sum tot = detail::mann_whitney_of_groups(g);
    detail::check_both_classes(who, tot.positive, tot.negative, weighted);
    detail::compensated_sum s, tp, fp;
    double x0 = 0, y0 = 0;
    for (auto it = g.rbegin(); it != g.rend(); ++it) {
        tp.add(it->positive);
        fp.add(it->negative);
        const bool last = it + 1 == g.rend();
        const double x1 = last ? 1.0 : fp.value() / tot.negative;
        const double y1 = last ? 1.0 : tp.value() / tot.positive;
        const double lo = std::max(x0, a), hi = std::min(x1, b);
        if (hi > lo) { // a non-vertical piece inside the range
            const double slope = (y1 - y0) / (x1 - x0);
            const double ylo = y0 + slope * (lo - x0), yhi = y0 + slope * (hi - x0);
            s.add((hi - lo) * (ylo + yhi) / 2);
        }
        x0 = x1;
        y0 = y1;
        if (x0 >= b)
            break;
    }
    return s.value();
}

struct eval {
    double fpr_low = 0;
    double fpr_high = 1;
    std::uint8_t standardized = 0;
    static constexpr std::string_view who() { return "measure partial AUC"; }
    double operator()(const std::vector<detail::tie_group>& g, bool weighted) const {
        check_range(who(), fpr_low, fpr_high);
        const double p = area(g, who(), weighted, fpr_low, fpr_high);
        if (!standardized)
            return p;
        const double mn = (fpr_high * fpr_high - fpr_low * fpr_low) / 2, mx = fpr_high - fpr_low;
        return (1 + (p - mn) / (mx - mn)) / 2;
    }
    bool operator==(const eval&) const = default;
    measure::partial_auc measure() const;
    /// After a load: the range as the measure checks it, standardized 0 or 1.
    void check_loaded() const {
        detail::check_loaded_parameters("fpr range", [&] { check_range(who(), fpr_low, fpr_high); });
        if (standardized > 1)
            detail::fail_loaded("standardized", "is not 0 or 1");
    }
    template <class F>
    void visit_state(F&& f) {
        f(fpr_low);
        f(fpr_high);
        f(standardized);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(fpr_low);
        f(fpr_high);
        f(standardized);
    }
};

} // namespace detail_pauc

/// Running state of partial_auc (carries the scores).
using partial_auc_accumulator = detail::grouped_accumulator<detail_pauc::eval>;

/// Area under the ROC curve for false positive rates in [fpr_low, fpr_high]; McClish-standardised
/// when `standardized`.
struct partial_auc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::score;
    using capabilities = offers<cap::whole_set, cap::serialisable>;
    static constexpr std::string_view key = "partial_auc";
    double fpr_low = 0;
    double fpr_high = 1;
    bool standardized = false;

    bool operator==(const partial_auc&) const = default;
    std::string name() const {
        return std::string(standardized ? "standardized partial AUC" : "partial AUC") + " [" +
               detail::number_text(fpr_low) + ", " + detail::number_text(fpr_high) + "]";
    }
    partial_auc_accumulator accumulator() const {
        detail_pauc::check_range("measure partial AUC", fpr_low, fpr_high);
        return partial_auc_accumulator(detail_pauc::eval{fpr_low, fpr_high, static_cast<std::uint8_t>(standardized)});
    }
};

} // namespace measure

inline measure::partial_auc measure::detail_pauc::eval::measure() const {
    return {fpr_low, fpr_high, standardized != 0};
}

HELDOUT_NAMESPACE_END
