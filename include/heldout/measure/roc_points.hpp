// heldout/measure/roc_points.hpp — the empirical ROC and precision-recall curves, one point per
// distinct score.
//
//   for (const heldout::roc_point& p : heldout::roc_points(truth, scores))
//       std::cout << p.false_positive_rate << ' ' << p.true_positive_rate << ' ' << p.threshold << '\n';
//   auto pr = heldout::pr_points(truth, scores, weights);   // {precision, recall, threshold}
//
// Convention: at threshold t a row is predicted positive when its score >= t. Thresholds are
// the distinct scores in decreasing order, so rates grow along the vector.
//  * roc_points starts with (0, 0) at threshold +infinity (nothing predicted positive), then one
//    point per distinct score; the last point is (1, 1) at the smallest score. Joining the points
//    by straight lines gives the curve whose area is measure::auc (tied scores are one point, so
//    ties become the diagonal segments of the Mann–Whitney form).
//  * pr_points has one point per distinct score (no start point: precision at recall 0 is 0/0;
//    measure::auprc states its own start convention). With weights, leading scores whose rows
//    all have weight zero predict no weight as positive (precision 0/0) and give no point.
// Weights (optional) are finite, non-negative, one per row; integer weights equal replicated
// rows. Errors: as measure::auc (input_error with the index); roc_points needs both classes,
// pr_points needs positives (undefined_error naming the missing class).
#pragma once

#include <heldout/measure/auc.hpp>

#include <limits>
#include <span>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// One point of the ROC curve: rates when predicting positive at score >= threshold.
struct roc_point {
    double false_positive_rate = 0;
    double true_positive_rate = 0;
    double threshold = 0;
};

/// One point of the precision-recall curve at score >= threshold.
struct pr_point {
    double precision = 0;
    double recall = 0;
    double threshold = 0;
};

namespace detail {

template <class T, class L, class W>
const std::vector<tie_group>& curve_groups(std::string_view who, std::span<const T> s, std::span<const L> y,
                                           std::span<const W> w, rank_scratch& sc) {
    static_assert(rankable_score_v<T>, "heldout: ranking measures take float or double scores");
    return ranked_groups(who, s, y, w, sc);
}

inline std::vector<roc_point> roc_of_groups(std::string_view who, const std::vector<tie_group>& g, bool weighted) {
    const weighted_rank_sum tot = mann_whitney_of_groups(g);
    check_both_classes(who, tot.positive, tot.negative, weighted);
    std::vector<roc_point> out;
    out.reserve(g.size() + 1);
    out.push_back({0.0, 0.0, std::numeric_limits<double>::infinity()});
    compensated_sum tp, fp; // exact for unit weights
    for (auto it = g.rbegin(); it != g.rend(); ++it) {
        tp.add(it->positive);
        fp.add(it->negative);
        out.push_back({fp.value() / tot.negative, tp.value() / tot.positive, it->score});
    }
    out.back().false_positive_rate = 1.0; // the sums ended at the totals: remove any last-bit residue
    out.back().true_positive_rate = 1.0;
    return out;
}

inline std::vector<pr_point> pr_of_groups(std::string_view who, const std::vector<tie_group>& g, bool weighted) {
    const weighted_rank_sum tot = mann_whitney_of_groups(g);
    if (!(tot.positive > 0))
        fail_undefined(who, std::string("class 1 (positives) is absent") +
                                (weighted ? " or has zero total weight" : "") + "; recall needs positives");
    std::vector<pr_point> out;
    out.reserve(g.size());
    compensated_sum tp, fp;
    for (auto it = g.rbegin(); it != g.rend(); ++it) {
        tp.add(it->positive);
        fp.add(it->negative);
        const double predicted = tp.value() + fp.value();
        if (predicted > 0)
            out.push_back({tp.value() / predicted, tp.value() / tot.positive, it->score});
    }
    return out;
}

} // namespace detail

/// ROC points: (0, 0) at threshold +inf, then one point per distinct score, decreasing.
template <label_range T, real_range S>
std::vector<roc_point> roc_points(const T& truth, const S& scores) {
    constexpr std::string_view who = "heldout::roc_points";
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         std::span<const double>(), sc);
    return detail::roc_of_groups(who, g, false);
}

/// Weighted ROC points (rates of weight).
template <label_range T, real_range S, weight_range W>
std::vector<roc_point> roc_points(const T& truth, const S& scores, const W& weights) {
    constexpr std::string_view who = "heldout::roc_points";
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         values_of(weights, who, "weights"), sc);
    return detail::roc_of_groups(who, g, true);
}

/// Precision-recall points, one per distinct score, decreasing.
template <label_range T, real_range S>
std::vector<pr_point> pr_points(const T& truth, const S& scores) {
    constexpr std::string_view who = "heldout::pr_points";
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         std::span<const double>(), sc);
    return detail::pr_of_groups(who, g, false);
}

/// Weighted precision-recall points.
template <label_range T, real_range S, weight_range W>
std::vector<pr_point> pr_points(const T& truth, const S& scores, const W& weights) {
    constexpr std::string_view who = "heldout::pr_points";
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         values_of(weights, who, "weights"), sc);
    return detail::pr_of_groups(who, g, true);
}

HELDOUT_NAMESPACE_END
