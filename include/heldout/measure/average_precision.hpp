// heldout/measure/average_precision.hpp — areas under the precision-recall curve: step-wise
// average precision and the trapezoidal PR AUC.
//
//   double ap = heldout::evaluate(heldout::measure::average_precision{}, truth, scores);
//   double tr = heldout::evaluate(heldout::measure::auprc{}, truth, scores);          // from (0, 1)
//   double t1 = heldout::evaluate(heldout::measure::auprc{heldout::measure::pr_start::first_precision},
//                                 truth, scores, weights);
//
// Rows are ranked by score, decreasing; the thresholds are the distinct scores and tied
// scores enter together as one group (so the value never depends on the order of ties).
// After group k: TP_k, FP_k (weights, or counts), P_k = TP_k / (TP_k + FP_k), R_k = TP_k / N_pos,
// R_0 = 0 (Davis & Goadrich 2006, worked by hand).
//  * average_precision = sum_k (R_k - R_{k-1}) P_k. Without ties it is the information-retrieval
//    mean of precision at the rank of each positive (Manning, Raghavan & Schütze 2008, ch. 8).
//  * auprc = sum_k (R_k - R_{k-1}) (P_k + P_{k-1}) / 2, the trapezoid through the PR points, which
//    starts at (R_0, P_0) = (0, 1) by default (pr_start::precision_one) or at (0, P_1)
//    (pr_start::first_precision). Linear interpolation in PR space is optimistic (Davis &
//    Goadrich 2006); use average_precision when in doubt.
// Weighted: integer weights equal replicated rows; groups of zero total weight are skipped.
// Undefined (undefined_error): no positives (or zero positive weight). No negatives is fine
// (both values are 1). Other errors as measure::auc.
#pragma once

#include <heldout/measure/auc.hpp>

#include <cstdint>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Where the trapezoidal PR curve starts at recall 0.
enum class pr_start : std::uint8_t {
    precision_one,  ///< (0, 1)
    first_precision ///< (0, P_1): the precision of the first threshold
};

struct average_precision;
struct auprc;

namespace detail_pr {

/// Visits the PR points (recall, precision) of the groups in decreasing score order.
template <class F>
double total_positive(const std::vector<detail::tie_group>& g, std::string_view who, bool weighted, F&& each) {
    detail::compensated_sum pos;
    for (const auto& t : g)
        pos.add(t.positive);
    const double p = pos.value();
    if (!(p > 0))
        detail::fail_undefined(who, std::string("class 1 (positives) is absent") +
                                        (weighted ? " or has zero total weight" : "") + "; recall needs positives");
    detail::compensated_sum tp, fp;
    for (auto it = g.rbegin(); it != g.rend(); ++it) {
        if (!(it->positive + it->negative > 0))
            continue; // a zero-weight group: no threshold there
        tp.add(it->positive);
        fp.add(it->negative);
        each(tp.value() / p, tp.value() / (tp.value() + fp.value()));
    }
    return p;
}

struct ap_eval {
    static constexpr std::string_view who() { return "measure average precision"; }
    double operator()(const std::vector<detail::tie_group>& g, bool weighted) const {
        detail::compensated_sum area;
        double r0 = 0;
        total_positive(g, who(), weighted, [&](double r, double prec) {
            area.add((r - r0) * prec);
            r0 = r;
        });
        return area.value();
    }
    bool operator==(const ap_eval&) const = default;
    measure::average_precision measure() const;
    template <class F>
    void visit_state(F&&) const {}
};

struct auprc_eval {
    std::uint8_t start = 0; // pr_start as its code, so that it is visitable state
    static constexpr std::string_view who() { return "measure PR AUC (trapezoidal)"; }
    double operator()(const std::vector<detail::tie_group>& g, bool weighted) const {
        detail::compensated_sum area;
        double r0 = 0, p0 = 1;
        bool first = true;
        total_positive(g, who(), weighted, [&](double r, double prec) {
            if (first && start == static_cast<std::uint8_t>(pr_start::first_precision))
                p0 = prec;
            first = false;
            area.add((r - r0) * (prec + p0) / 2);
            r0 = r;
            p0 = prec;
        });
        return area.value();
    }
    bool operator==(const auprc_eval&) const = default;
    measure::auprc measure() const;
    /// After a load: a known pr_start code.
    void check_loaded() const {
        if (start > static_cast<std::uint8_t>(pr_start::first_precision))
            detail::fail_loaded("start", "unknown code " + std::to_string(start));
    }
    template <class F>
    void visit_state(F&& f) {
        f(start);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(start);
    }
};

} // namespace detail_pr

/// Running state of average_precision (carries the scores).
using average_precision_accumulator = detail::grouped_accumulator<detail_pr::ap_eval>;
/// Running state of auprc (carries the scores).
using auprc_accumulator = detail::grouped_accumulator<detail_pr::auprc_eval>;

/// Step-wise area under the PR curve, tied scores one group.
struct average_precision {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::score;
    using capabilities = offers<cap::whole_set, cap::serialisable>;
    static constexpr std::string_view key = "average_precision";
    std::string name() const { return "average precision"; }
    average_precision_accumulator accumulator() const { return {}; }
};

/// Trapezoidal area under the PR curve from (0, 1), or from (0, P_1) with pr_start::first_precision.
struct auprc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::score;
    using capabilities = offers<cap::whole_set, cap::serialisable>;
    static constexpr std::string_view key = "auprc";
    pr_start start = pr_start::precision_one;
    bool operator==(const auprc&) const = default;
    std::string name() const {
        return start == pr_start::precision_one ? "PR AUC (trapezoidal)"
                                                : "PR AUC (trapezoidal, from the first precision)";
    }
    auprc_accumulator accumulator() const {
        return auprc_accumulator(detail_pr::auprc_eval{static_cast<std::uint8_t>(start)});
    }
};

} // namespace measure

inline measure::average_precision measure::detail_pr::ap_eval::measure() const { return {}; }
inline measure::auprc measure::detail_pr::auprc_eval::measure() const {
    return {static_cast<measure::pr_start>(start)};
}

HELDOUT_NAMESPACE_END
