// heldout/report/plots.hpp — the pictures of an evaluation, as SVG text: ROC and
// precision-recall curves of several models, a calibration (reliability) diagram with
// per-bin counts and intervals, per-split values as a strip plot, and a critical-difference
// diagram.
//
//   using namespace heldout::report;
//   std::vector<roc_series> roc{{"logistic", fpr_a, tpr_a}, {"5-NN", fpr_b, tpr_b}};
//   save(roc_plot(roc), "roc.svg");
//   std::vector<pr_series> pr{pr_series_of("logistic", heldout::pr_points(y, p_a))};
//   save(pr_plot(pr, 0.15), "pr.svg");                   // 0.15: the share of positives
//
//   std::vector<calibration_series> cal{{"logistic", reliability_bins(truth, prob_a, 10)}};
//   save(calibration_plot(cal), "calibration.svg");
//
//   std::vector<strip_group> folds{{"logistic", errors_a}, {"5-NN", errors_b}};
//   save(strip_plot(folds, {.title = "Error per fold", .value_label = "error", .paired = true}),
//        "folds.svg");
//
//   save(critical_difference_plot(names, average_ranks, cd), "cd.svg");   // ranks: 1 = best
//
// The numbers come from elsewhere (roc_points, the aggregator, the Friedman ranks and the
// Nemenyi CD); these functions only draw them, except reliability_bins, which bins
// probabilities with heldout::reliability (calibration/reliability.hpp): the equal-width bins
// of Naeini, Cooper & Hauskrecht (2015), B_1 = [0, 1/M], B_m = ((m-1)/M, m/M], edges computed
// by division so that 0.07 lands in bin 7 of 100 (ceil(0.07 * 100) would say 8), each with
// the Wilson interval (Wilson 1927) of its observed rate, drawn as a whisker.
#pragma once

#include <heldout/calibration/reliability.hpp>
#include <heldout/core/random.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/report/svg.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <numeric>
#include <optional>
#include <ranges>
#include <span>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace report {

/// One model's ROC curve: false and true positive rates, in curve order.
struct roc_series {
    std::string name;
    std::vector<double> fpr;
    std::vector<double> tpr;
};

/// A ROC series from the points of heldout::roc_points (a range of points with members
/// false_positive_rate and true_positive_rate, or fpr and tpr), or from one object holding
/// fpr and tpr ranges.
template <class Points>
roc_series roc_series_of(std::string name, const Points& points) {
    roc_series s{std::move(name), {}, {}};
    if constexpr (requires {
                      std::ranges::begin(points.fpr);
                      std::ranges::begin(points.tpr);
                  }) {
        s.fpr.assign(std::ranges::begin(points.fpr), std::ranges::end(points.fpr));
        s.tpr.assign(std::ranges::begin(points.tpr), std::ranges::end(points.tpr));
    } else {
        for (const auto& p : points) {
            if constexpr (requires {
                              p.false_positive_rate;
                              p.true_positive_rate;
                          }) {
                s.fpr.push_back(static_cast<double>(p.false_positive_rate));
                s.tpr.push_back(static_cast<double>(p.true_positive_rate));
            } else {
                s.fpr.push_back(static_cast<double>(p.fpr));
                s.tpr.push_back(static_cast<double>(p.tpr));
            }
        }
    }
    return s;
}

/// ROC curves on the unit square with the chance diagonal; a curve that does not start at
/// (0, 0) or end at (1, 1) is drawn from and to those corners (every ROC curve passes them).
inline std::string roc_plot(std::span<const roc_series> curves, std::string title = "ROC curves",
                            std::string subtitle = "") {
    constexpr std::string_view who = "heldout::report::roc_plot";
    if (curves.empty())
        detail::fail(who, "curves", "empty input");
    figure fig({.title = std::move(title),
                .x = {.label = "false positive rate (1 - specificity)", .lo = 0, .hi = 1, .fixed = true},
                .y = {.label = "true positive rate (sensitivity)", .lo = 0, .hi = 1, .fixed = true},
                .width = 600,
                .height = 580,
                .legend = legend_place::bottom_right,
                .subtitle = std::move(subtitle)});
    fig.reference_line(0, 0, 1, 1);
    for (std::size_t c = 0; c < curves.size(); ++c) {
        const auto& s = curves[c];
        const std::string arg = "curves[" + std::to_string(c) + "]";
        if (s.fpr.size() != s.tpr.size())
            detail::fail(who, arg, "fpr and tpr differ in size");
        if (s.fpr.empty())
            detail::fail(who, arg, "no points");
        detail::check_probabilities(who, arg + ".fpr", std::span<const double>(s.fpr));
        detail::check_probabilities(who, arg + ".tpr", std::span<const double>(s.tpr));
        std::vector<double> x, y;
        if (s.fpr.front() != 0 || s.tpr.front() != 0) {
            x.push_back(0);
            y.push_back(0);
        }
        x.insert(x.end(), s.fpr.begin(), s.fpr.end());
        y.insert(y.end(), s.tpr.begin(), s.tpr.end());
        if (x.back() != 1 || y.back() != 1) {
            x.push_back(1);
            y.push_back(1);
        }
        fig.line(s.name, x, y);
    }
    return fig.str();
}

/// One model's precision-recall curve: recall and precision, in order of decreasing
/// threshold (recall growing).
struct pr_series {
    std::string name;
    std::vector<double> recall;
    std::vector<double> precision;
};

/// A precision-recall series from the points of heldout::pr_points (members recall and
/// precision).
template <class Points>
pr_series pr_series_of(std::string name, const Points& points) {
    pr_series s{std::move(name), {}, {}};
    for (const auto& p : points) {
        s.recall.push_back(static_cast<double>(p.recall));
        s.precision.push_back(static_cast<double>(p.precision));
    }
    return s;
}

/// Precision-recall curves on the unit square, drawn as steps: between the recalls of two
/// neighbouring thresholds the precision of the lower threshold holds, so the area under the
/// drawn curve is the average precision. Straight lines between the points would overstate
/// precision (Davis & Goadrich 2006, ICML, section 4). A dashed line marks `prevalence`, the
/// precision of a model that ranks at random (omit it with a value outside (0, 1)).
inline std::string pr_plot(std::span<const pr_series> curves, double prevalence = -1,
                           std::string title = "Precision-recall curves", std::string subtitle = "") {
    constexpr std::string_view who = "heldout::report::pr_plot";
    if (curves.empty())
        detail::fail(who, "curves", "empty input");
    figure fig({.title = std::move(title),
                .x = {.label = "recall (sensitivity)", .lo = 0, .hi = 1, .fixed = true},
                .y = {.label = "precision", .lo = 0, .hi = 1, .fixed = true},
                .width = 600,
                .height = 580,
                .legend = legend_place::bottom_left,
                .subtitle = std::move(subtitle)});
    if (prevalence > 0 && prevalence < 1)
        fig.reference_line(0, prevalence, 1, prevalence);
    for (std::size_t c = 0; c < curves.size(); ++c) {
        const auto& s = curves[c];
        const std::string arg = "curves[" + std::to_string(c) + "]";
        if (s.recall.size() != s.precision.size())
            detail::fail(who, arg, "recall and precision differ in size");
        if (s.recall.empty())
            detail::fail(who, arg, "no points");
        detail::check_probabilities(who, arg + ".recall", std::span<const double>(s.recall));
        detail::check_probabilities(who, arg + ".precision", std::span<const double>(s.precision));
        std::vector<double> x, y;
        double last_recall = 0;
        for (std::size_t i = 0; i < s.recall.size(); ++i) {
            if (s.recall[i] < last_recall)
                detail::fail_at(who, arg + ".recall", "decreases (points must go by decreasing threshold)", i);
            x.push_back(last_recall);
            y.push_back(s.precision[i]);
            x.push_back(s.recall[i]);
            y.push_back(s.precision[i]);
            last_recall = s.recall[i];
        }
        fig.line(s.name, x, y);
    }
    return fig.str();
}

/// One regression model's predictions beside the truth.
struct scatter_series {
    std::string name;
    std::vector<double> observed;
    std::vector<double> predicted;
};

/// Predicted against observed values of regression models, one point colour per model, with
/// the diagonal of perfect prediction. Above `max_points` rows a model is thinned to every
/// ceil(n / max_points)-th row (in row order, so the picture is reproducible), and the
/// subtitle says so.
inline std::string predicted_observed_plot(std::span<const scatter_series> models,
                                           std::string title = "Predicted against observed", std::string subtitle = "",
                                           std::size_t max_points = 2000) {
    constexpr std::string_view who = "heldout::report::predicted_observed_plot";
    if (models.empty())
        detail::fail(who, "models", "empty input");
    if (max_points < 1)
        detail::fail(who, "max_points", "must be at least 1");
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    std::size_t step = 1;
    for (std::size_t m = 0; m < models.size(); ++m) {
        const auto& s = models[m];
        const std::string arg = "models[" + std::to_string(m) + "]";
        if (s.observed.size() != s.predicted.size())
            detail::fail(who, arg, "observed and predicted differ in size");
        if (s.observed.empty())
            detail::fail(who, arg, "no points");
        detail::check_finite(who, arg + ".observed", std::span<const double>(s.observed));
        detail::check_finite(who, arg + ".predicted", std::span<const double>(s.predicted));
        for (std::size_t i = 0; i < s.observed.size(); ++i) {
            lo = std::min({lo, s.observed[i], s.predicted[i]});
            hi = std::max({hi, s.observed[i], s.predicted[i]});
        }
        step = std::max(step, (s.observed.size() + max_points - 1) / max_points);
    }
    if (step > 1)
        subtitle += (subtitle.empty() ? "" : "; ") + std::string("every ") + std::to_string(step) + "th row shown";
    figure fig({.title = std::move(title),
                .x = {.label = "observed"},
                .y = {.label = "predicted"},
                .width = 600,
                .height = 560,
                .legend = legend_place::top_left,
                .subtitle = std::move(subtitle)});
    fig.reference_line(lo, lo, hi, hi);
    for (std::size_t m = 0; m < models.size(); ++m) {
        std::vector<double> x, y;
        for (std::size_t i = 0; i < models[m].observed.size(); i += step) {
            x.push_back(models[m].observed[i]);
            y.push_back(models[m].predicted[i]);
        }
        fig.points(models[m].name, x, y, palette(m), 2.4);
        if (x.size() > 200)
            fig.opacity(0.5);
    }
    return fig.str();
}

/// One non-empty bin of a reliability diagram.
struct reliability_bin {
    std::size_t index = 0;       ///< bin number 0..M-1
    double lower = 0, upper = 0; ///< the bin is (lower, upper], the first one [0, upper]
    std::size_t count = 0;       ///< predictions in the bin
    double mean_probability = 0; ///< their mean predicted probability
    double observed_rate = 0;    ///< the share of them whose truth is 1
    double rate_lower = 0;       ///< Wilson interval of observed_rate at the level asked for
    double rate_upper = 0;       ///<
    std::size_t positives = 0;   ///< predictions in the bin whose truth is 1
};

/// The non-empty equal-width bins of predicted probabilities (binary, positive class), each
/// with the Wilson interval of its observed rate at `level`.
/// truth: 0/1 (integral, or floating point 0.0/1.0); probability: values in [0, 1].
template <value_range T, real_range P>
std::vector<reliability_bin> reliability_bins(const T& truth, const P& probability, std::size_t bins = 10,
                                              double level = 0.95) {
    // The bins of heldout::reliability (calibration/reliability.hpp), with their Wilson
    // intervals; its checks name this function.
    std::vector<reliability_bin> out;
    for (const calibration_bin& b : heldout::detail::reliability_for("heldout::report::reliability_bins", truth,
                                                                     probability, bins, {.level = level}))
        out.push_back({b.index, b.left, b.right, b.count, b.mean_predicted, b.observed, b.lower, b.upper,
                       static_cast<std::size_t>(std::llround(b.observed * static_cast<double>(b.count)))});
    return out;
}

/// One model's reliability bins.
struct calibration_series {
    std::string name;
    std::vector<reliability_bin> bins;
};

/// Reliability diagram: observed rate against mean predicted probability, one marked line
/// per model with the Wilson interval of each bin's rate, and the diagonal of perfect
/// calibration; below it, a histogram of the predictions per bin (bars side by side per
/// model, on a count axis of their own), so that points resting on few predictions show.
inline std::string calibration_plot(std::span<const calibration_series> models,
                                    std::string title = "Calibration (reliability diagram)",
                                    std::string subtitle = "bars: Wilson 95% intervals of the observed rates") {
    constexpr std::string_view who = "heldout::report::calibration_plot";
    if (models.empty())
        detail::fail(who, "models", "empty input");
    for (std::size_t m = 0; m < models.size(); ++m)
        if (models[m].bins.empty())
            detail::fail(who, "models[" + std::to_string(m) + "]", "no bins");
    figure fig({.title = std::move(title),
                .x = {.label = "mean predicted probability", .lo = 0, .hi = 1, .fixed = true},
                .y = {.label = "observed frequency of the event", .lo = 0, .hi = 1, .fixed = true},
                .width = 600,
                .height = 520,
                .legend = legend_place::top_left,
                .subtitle = std::move(subtitle)});
    fig.reference_line(0, 0, 1, 1);
    // a model's error bars sit a little beside its points when several models share a bin
    const double spread = models.size() > 1 ? 0.006 : 0.0;
    for (std::size_t m = 0; m < models.size(); ++m) {
        const double shift = spread * (static_cast<double>(m) - 0.5 * static_cast<double>(models.size() - 1));
        for (const auto& b : models[m].bins)
            fig.error_bar(b.mean_probability + shift, b.rate_lower, b.rate_upper, palette(m), 1.2);
    }
    for (std::size_t m = 0; m < models.size(); ++m) {
        std::vector<double> x, y;
        for (const auto& b : models[m].bins) {
            x.push_back(b.mean_probability);
            y.push_back(b.observed_rate);
        }
        fig.line_points(models[m].name, x, y, palette(m));
    }
    // the histogram: a count axis from 0 to the fullest bin, bars inside each bin's edges
    std::size_t top = 0;
    for (const auto& s : models)
        for (const auto& b : s.bins)
            top = std::max(top, b.count);
    figure hist({.title = "",
                 .x = {.label = "predicted probability (bin edges)", .lo = 0, .hi = 1, .fixed = true},
                 .y = {.label = "predictions", .lo = 0, .hi = static_cast<double>(top)},
                 .width = 600,
                 .height = 190,
                 .grid = true});
    const double slot = 0.8 / static_cast<double>(models.size());
    for (std::size_t m = 0; m < models.size(); ++m)
        for (const auto& b : models[m].bins) {
            const double w = (b.upper - b.lower) * slot;
            const double x0 = b.lower + (b.upper - b.lower) * 0.1 + w * static_cast<double>(m);
            hist.bar(x0, x0 + w, 0, static_cast<double>(b.count), palette(m), 0.8);
        }
    const std::string parts[] = {fig.str(), hist.str()};
    return stack(parts);
}

/// One group of a strip plot: its name and its values (e.g. one model's error per fold).
struct strip_group {
    std::string name;
    std::vector<double> values;
};

struct strip_options {
    std::string title = "Values per split";
    std::string value_label = "value";
    std::string subtitle{};
    bool paired = false;               ///< value i of every group comes from the same split
    std::size_t paired_lines_max = 20; ///< join paired values by lines only up to this many per group
    std::optional<double> reference{}; ///< a dashed horizontal line (e.g. 0 for differences)
    std::uint64_t seed = 1;            ///< horizontal jitter (heldout::rng), so the picture is reproducible
};

/// A strip plot: each group's values as jittered points over its name, a box from the
/// first to the third quartile (linear interpolation between order statistics, Hyndman &
/// Fan 1996 type 7) from 5 values on, and a bar at the group's mean. With paired = true and
/// at most paired_lines_max values per group, thin grey lines join value i of neighbouring
/// groups; with more (100 splits) they would only tangle, so the points are drawn smaller
/// and translucent instead, and the pairing is left to a plot of the differences.
inline std::string strip_plot(std::span<const strip_group> groups, const strip_options& o = {}) {
    constexpr std::string_view who = "heldout::report::strip_plot";
    if (groups.empty())
        detail::fail(who, "groups", "empty input");
    axis xa{.label = ""};
    std::size_t most = 0;
    for (std::size_t g = 0; g < groups.size(); ++g) {
        if (groups[g].values.empty())
            detail::fail(who, "groups[" + std::to_string(g) + "]", "no values");
        detail::check_finite(who, "groups[" + std::to_string(g) + "].values",
                             std::span<const double>(groups[g].values));
        if (o.paired && groups[g].values.size() != groups[0].values.size())
            detail::fail(who, "groups[" + std::to_string(g) + "]", "paired groups must hold the same number of values");
        xa.categories.emplace_back(static_cast<double>(g + 1), groups[g].name);
        most = std::max(most, groups[g].values.size());
    }
    if (o.reference && !std::isfinite(*o.reference))
        detail::fail(who, "reference", "not finite");
    // wide enough for the groups and for the title lines (estimated text widths)
    double label_w = 0;
    for (const auto& g : groups)
        label_w = std::max(label_w, text_width(g.name, 11));
    const double per_group = std::max(150.0, label_w + 24);
    const double width = std::max({420.0, per_group * static_cast<double>(groups.size()) + 140,
                                   text_width(o.title, 16) + 40, text_width(o.subtitle, 12) + 40});
    figure fig({.title = o.title,
                .x = std::move(xa),
                .y = {.label = o.value_label},
                .width = width,
                .height = 480,
                .legend = legend_place::top_right,
                .subtitle = o.subtitle});
    if (o.reference)
        fig.reference_line(0.5, *o.reference, static_cast<double>(groups.size()) + 0.5, *o.reference);
    const bool many = most > 30;
    rng jitter(o.seed);
    std::vector<std::vector<double>> xs(groups.size());
    for (std::size_t g = 0; g < groups.size(); ++g)
        for (std::size_t i = 0; i < groups[g].values.size(); ++i)
            xs[g].push_back(static_cast<double>(g + 1) + (jitter.uniform() - 0.5) * (many ? 0.4 : 0.3));
    for (std::size_t g = 0; g < groups.size(); ++g) { // boxes first: points go on top
        std::vector<double> v = groups[g].values;
        if (v.size() < 5)
            continue;
        std::sort(v.begin(), v.end());
        auto quantile = [&](double q) {
            const double h = (static_cast<double>(v.size()) - 1) * q;
            const auto lo = static_cast<std::size_t>(std::floor(h));
            const std::size_t hi = std::min(lo + 1, v.size() - 1);
            return v[lo] + (h - static_cast<double>(lo)) * (v[hi] - v[lo]);
        };
        const double c = static_cast<double>(g + 1);
        fig.bar(c - 0.28, c + 0.28, quantile(0.25), quantile(0.75), palette(g), 0.18);
    }
    if (o.paired && most <= o.paired_lines_max)
        for (std::size_t g = 0; g + 1 < groups.size(); ++g)
            for (std::size_t i = 0; i < groups[g].values.size(); ++i)
                fig.reference_line(xs[g][i], groups[g].values[i], xs[g + 1][i], groups[g + 1].values[i], "#cccccc", "");
    for (std::size_t g = 0; g < groups.size(); ++g) {
        const auto& v = groups[g].values;
        fig.points("", xs[g], v, palette(g), many ? 2.2 : 3.2);
        if (many)
            fig.opacity(0.55);
        const double mean = std::accumulate(v.begin(), v.end(), 0.0) / static_cast<double>(v.size());
        fig.segment(static_cast<double>(g + 1) - 0.3, static_cast<double>(g + 1) + 0.3, mean, "#222222", 2.5);
    }
    return fig.str();
}

/// Groups of models whose average ranks differ by less than the critical difference, as
/// (first, last) positions in the models sorted by rank (best first); only maximal groups
/// of two or more are listed, in order. A model in no group differs from every other.
inline std::vector<std::pair<std::size_t, std::size_t>> critical_difference_groups(std::span<const double> sorted_ranks,
                                                                                   double cd) {
    constexpr std::string_view who = "heldout::report::critical_difference_groups";
    for (std::size_t i = 1; i < sorted_ranks.size(); ++i)
        if (!(sorted_ranks[i - 1] <= sorted_ranks[i]))
            detail::fail_at(who, "sorted_ranks", "not in ascending order", i);
    if (!(cd > 0) || !std::isfinite(cd))
        detail::fail(who, "cd", "must be positive and finite");
    std::vector<std::pair<std::size_t, std::size_t>> out;
    std::size_t last_end = 0;
    for (std::size_t i = 0; i < sorted_ranks.size(); ++i) {
        std::size_t j = i;
        while (j + 1 < sorted_ranks.size() && sorted_ranks[j + 1] - sorted_ranks[i] < cd)
            ++j;
        // maximal: not contained in the previous group (which started earlier)
        if (j > i && (out.empty() || j > last_end)) {
            out.emplace_back(i, j);
            last_end = j;
        }
    }
    return out;
}

/// Critical-difference diagram (after Demšar 2006, JMLR 7:1-30, Section 3.2.2): the average
/// ranks on an axis from 1 (best, left) to k, each model's name joined to its rank, a bar of
/// length CD, and thick bars joining models whose ranks differ by less than CD.
inline std::string critical_difference_plot(std::span<const std::string> models, std::span<const double> average_ranks,
                                            double cd, std::string title = "Average ranks (1 = best)",
                                            std::string subtitle = "") {
    constexpr std::string_view who = "heldout::report::critical_difference_plot";
    const std::size_t k = models.size();
    if (k < 2)
        detail::fail(who, "models", "at least two models are needed");
    detail::check_same_size(who, "average_ranks", k, average_ranks.size(), "models");
    for (std::size_t i = 0; i < k; ++i)
        if (!(average_ranks[i] >= 1 && average_ranks[i] <= static_cast<double>(k)))
            detail::fail_at(who, "average_ranks", "rank outside [1, number of models]", i);
    if (!(cd > 0) || !std::isfinite(cd))
        detail::fail(who, "cd", "must be positive and finite");

    std::vector<std::size_t> order(k);
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return average_ranks[a] < average_ranks[b]; });
    std::vector<double> sorted(k);
    for (std::size_t i = 0; i < k; ++i)
        sorted[i] = average_ranks[order[i]];
    const auto groups = critical_difference_groups(sorted, cd);

    const std::size_t left_count = (k + 1) / 2;
    double name_w = 0;
    for (const auto& m : models)
        name_w = std::max(name_w, text_width(m, 12) + text_width(" (0.00)", 12));
    const double width = std::max(640.0, 2 * name_w + 360);
    const double margin = name_w + 40;
    const double x0 = margin, x1 = width - margin;
    const double axis_y = (title.empty() ? 40.0 : 84.0) + (subtitle.empty() ? 0.0 : 14.0);
    const double row = 22;
    const double group_y = axis_y + 16;
    const double names_y = group_y + 10 * static_cast<double>(groups.size()) + 18;
    const double height = names_y + row * static_cast<double>(std::max(left_count, k - left_count)) + 20;
    auto px = [&](double r) { return x0 + (r - 1) / static_cast<double>(k - 1) * (x1 - x0); };

    svg doc(width, height);
    doc.title(title);
    if (!title.empty())
        doc.text(width / 2, 26, title, {.size = 16, .align = anchor::middle, .bold = true});
    if (!subtitle.empty())
        doc.text(width / 2, 45, subtitle, {.size = 12, .align = anchor::middle, .fill = "#555555"});
    const style ink{.stroke = "#222222", .stroke_width = 1.2};
    doc.line(x0, axis_y, x1, axis_y, ink);
    for (std::size_t r = 1; r <= k; ++r) {
        const double x = px(static_cast<double>(r));
        doc.line(x, axis_y - 6, x, axis_y, ink);
        doc.text(x, axis_y - 10, std::to_string(r), {.size = 11, .align = anchor::middle});
    }
    // the CD bar, drawn from rank 1
    const double cd_y = axis_y - 32;
    const double cd_end = px(std::min(1 + cd, static_cast<double>(k)));
    doc.line(px(1), cd_y, cd_end, cd_y, {.stroke = "#222222", .stroke_width = 2});
    doc.line(px(1), cd_y - 4, px(1), cd_y + 4, ink);
    doc.line(cd_end, cd_y - 4, cd_end, cd_y + 4, ink);
    doc.text(cd_end + 6, cd_y + 4, "CD = " + number(cd, 2), {.size = 11});

    for (std::size_t g = 0; g < groups.size(); ++g) {
        const double y = group_y + 10 * static_cast<double>(g);
        doc.line(px(sorted[groups[g].first]) - 4, y, px(sorted[groups[g].second]) + 4, y,
                 {.stroke = "#D55E00", .stroke_width = 4});
    }
    for (std::size_t i = 0; i < k; ++i) {
        const std::size_t m = order[i];
        const bool left = i < left_count;
        const double y = names_y + row * static_cast<double>(left ? i : k - 1 - i);
        const double x = px(sorted[i]);
        const double end_x = left ? x0 - 10 : x1 + 10;
        const double xs[] = {x, x, end_x}, ys[] = {axis_y, y, y};
        doc.polyline(xs, ys, {.stroke = "#555555", .stroke_width = 1});
        doc.circle(x, axis_y, 3, {.fill = "#222222"});
        doc.text(left ? end_x - 4 : end_x + 4, y + 4, models[m] + " (" + number(average_ranks[m], 2) + ")",
                 {.size = 12, .align = left ? anchor::end : anchor::start});
    }
    return doc.str();
}

} // namespace report
HELDOUT_NAMESPACE_END
