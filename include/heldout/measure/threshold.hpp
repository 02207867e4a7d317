// heldout/measure/threshold.hpp — choosing an operating threshold on a score: the cost-optimal
// threshold for a 2 x 2 cost matrix (optionally under class priors other than the sample's),
// and the threshold maximising Youden's J.
//
//   Eigen::Matrix2d cost;            // row = true class, column = predicted class
//   cost << 0, 1,                    // a false positive costs 1
//           5, 0;                    // a false negative costs 5
//   heldout::cost_optimal_point c = heldout::cost_optimal_threshold(truth, scores, cost);
//   // c.threshold, c.expected_cost, c.true_positive_rate, c.false_positive_rate
//   auto d = heldout::cost_optimal_threshold(truth, scores, cost, 0.01);  // deployment prevalence 1 %
//   heldout::youden_point j = heldout::youden_threshold(truth, scores);  // j.threshold, j.youden_j, ...
//
// Convention: predict positive when score >= threshold. Candidates are the distinct scores and
// +infinity (predict nothing positive), i.e. every point of roc_points, so the optimum is exact.
// Expected cost per case at a candidate, with pi1 the positive prior (the sample's m / (m + n)
// unless given) and pi0 = 1 - pi1:
//   pi1 [(1 - TPR) C(1,0) + TPR C(1,1)] + pi0 [FPR C(0,1) + (1 - FPR) C(0,0)].
// Youden's J = TPR - FPR (Youden 1950, Cancer 3:32-35) = sensitivity + specificity - 1.
// Ties between candidates go to the highest threshold (the first found scanning down).
// Errors: as measure::auc; a cost matrix entry not finite, or a prior outside (0, 1) ->
// input_error; one class absent -> undefined_error.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/measure/roc_points.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END

#include <optional>
#include <string>

HELDOUT_NAMESPACE_BEGIN

/// The cost-optimal operating point.
struct cost_optimal_point {
    double threshold = 0;     ///< predict positive when score >= threshold (+inf: never)
    double expected_cost = 0; ///< per case, under the priors used
    double true_positive_rate = 0;
    double false_positive_rate = 0;
    double positive_prior = 0; ///< the pi1 used
};

/// The operating point maximising Youden's J.
struct youden_point {
    double threshold = 0;
    double youden_j = 0; ///< TPR - FPR
    double true_positive_rate = 0;
    double false_positive_rate = 0;
};

/// Cost-optimal threshold for costs C(true, predicted); positive_prior overrides the sample's.
template <label_range T, real_range S>
cost_optimal_point cost_optimal_threshold(const T& truth, const S& scores, const Eigen::Matrix2d& cost,
                                          std::optional<double> positive_prior = std::nullopt) {
    constexpr std::string_view who = "heldout::cost_optimal_threshold";
    for (int i = 0; i < 4; ++i)
        if (!std::isfinite(cost.data()[i]))
            detail::fail(who, "cost", "entry not finite");
    if (positive_prior && !(*positive_prior > 0 && *positive_prior < 1))
        detail::fail(who, "positive_prior", "must lie in (0, 1), got " + detail::number_text(*positive_prior));
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         std::span<const double>(), sc);
    const auto pts = detail::roc_of_groups(who, g, false);
    const auto tot = detail::mann_whitney_of_groups(g);
    const double pi1 = positive_prior ? *positive_prior : tot.positive / (tot.positive + tot.negative);
    const double pi0 = 1 - pi1;
    cost_optimal_point best;
    bool have = false;
    for (const auto& p : pts) {
        const double c = pi1 * ((1 - p.true_positive_rate) * cost(1, 0) + p.true_positive_rate * cost(1, 1)) +
                         pi0 * (p.false_positive_rate * cost(0, 1) + (1 - p.false_positive_rate) * cost(0, 0));
        if (!have || c < best.expected_cost) {
            best = {p.threshold, c, p.true_positive_rate, p.false_positive_rate, pi1};
            have = true;
        }
    }
    return best;
}

/// Threshold maximising Youden's J = TPR - FPR.
template <label_range T, real_range S>
youden_point youden_threshold(const T& truth, const S& scores) {
    constexpr std::string_view who = "heldout::youden_threshold";
    auto& sc = detail::thread_scratch();
    const auto& g = detail::curve_groups(who, values_of(scores, who, "scores"), values_of(truth, who, "truth"),
                                         std::span<const double>(), sc);
    const auto pts = detail::roc_of_groups(who, g, false);
    youden_point best{pts[0].threshold, 0.0, 0.0, 0.0};
    for (const auto& p : pts) {
        const double j = p.true_positive_rate - p.false_positive_rate;
        if (j > best.youden_j)
            best = {p.threshold, j, p.true_positive_rate, p.false_positive_rate};
    }
    return best;
}

HELDOUT_NAMESPACE_END
