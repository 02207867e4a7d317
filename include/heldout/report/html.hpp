// heldout/report/html.hpp — one self-contained HTML page of an evaluation: the estimates with
// their intervals and methods, the pairwise comparisons, ROC and precision-recall curves, the
// reliability diagram with per-bin counts and intervals, per-split values, the
// critical-difference diagram of several models, notes, and the cautions every report carries.
// One file: inline SVG and CSS only, no scripts, no external files; it works offline and prints.
//
//   heldout::report::html_report page({.title = "Pump failures: two models",
//                                      .subtitle = "10 x 10-fold stratified CV, 1200 pumps"});
//   page.estimates(estimates);                  // heldout::estimate, named by aggregator::set_model
//   page.comparisons(heldout::compare_all_pairs(aggs, heldout::measure::auc{}));
//   page.curves(names, truth, scores);          // ROC and precision-recall
//   page.reliability(names, truth, probabilities);
//   page.per_split(auc_estimates);              // values per split, and paired differences
//   page.ranks(auc_estimates, heldout::direction::higher_is_better);   // CD diagram, 3+ models
//   page.notes(notes);
//   page.save("report.html");                   // or page.str()
//
// Sections appear in the order they are added, listed in a table of contents at the top; the
// cautions (standard_cautions(), README's "Cautions") close every page unless turned off.
// Numbers for people (report/numbers.hpp): each estimate with as many digits as its interval
// supports; full precision stays in the library's JSON and CSV exports. All text is escaped.
// The ctest report.browser loads such a page in headless chromium: no error logged, every
// figure rendered, no label cut off or overlapping, no overflow at 1200 and 700 px (docs/report.md).
#pragma once

#include <heldout/compare/comparison.hpp>
#include <heldout/compare/friedman.hpp>
#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/roc_points.hpp>
#include <heldout/report/numbers.hpp>
#include <heldout/report/plots.hpp>
#include <heldout/report/svg.hpp>
#include <heldout/version.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace report {

/// The cautions every report carries (README, "Cautions"; a ctest keeps the two in step).
inline const std::vector<std::string>& standard_cautions() {
    static const std::vector<std::string> text{
        "An estimate describes the data-generating process its data came from, and no other: a shift in time, "
        "place or population voids it. Re-estimate on data from the process you deploy into.",
        "A model that affects people \xE2\x80\x94 credit, health, hiring, safety \xE2\x80\x94 needs validation under "
        "the local rules that govern it, by qualified people. heldout's numbers are one input to that work, not a "
        "substitute for it."};
    return text;
}

/// What the page looks like.
struct html_options {
    std::string title = "Evaluation report";
    std::string subtitle{}; ///< one line under the title (the data, the plan)
    bool cautions = true;   ///< close with standard_cautions() and the cautions added
};

namespace detail_html {

inline std::string esc(std::string_view s) { return xml_escape(s); }

inline constexpr std::string_view css = R"(
body{font-family:"DejaVu Sans",Helvetica,Arial,sans-serif;color:#222;max-width:1100px;margin:0 auto;padding:16px 24px;line-height:1.4}
h1{font-size:1.6em;margin:.2em 0}h2{font-size:1.25em;margin-top:1.8em;border-bottom:1px solid #ccc;padding-bottom:.2em}
p.sub{color:#555;margin-top:0}nav ol{columns:2;font-size:.95em}
table{border-collapse:collapse;margin:.6em 0;font-size:.92em;display:block;max-width:max-content;overflow-x:auto}th,td{border:1px solid #ccc;padding:3px 8px;text-align:left;vertical-align:top}
th{background:#f2f2f2}td.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
figure{margin:1em 0}figure svg{max-width:100%;height:auto;border:1px solid #eee}figcaption{font-size:.9em;color:#444;max-width:900px}
details{font-size:.9em}details ul{margin:.3em 0;padding-left:1.2em}.caution{background:#fff6e5;border-left:4px solid #E69F00;padding:6px 12px}
footer{margin-top:3em;font-size:.85em;color:#666}
@media print{nav{display:none}figure{break-inside:avoid}}
)";

/// "<details><summary>N notes</summary><ul>...</ul></details>", or "" without notes.
inline std::string notes_cell(const std::vector<std::string>& notes) {
    if (notes.empty())
        return "";
    std::string s = "<details><summary>" + std::to_string(notes.size()) + (notes.size() == 1 ? " note" : " notes") +
                    "</summary><ul>";
    for (const auto& n : notes)
        s += "<li>" + esc(n) + "</li>";
    return s + "</ul></details>";
}

inline std::string level_header(double level) {
    return number(level * 100, std::abs(level * 100 - std::round(level * 100)) < 1e-9 ? 0 : 2) + "% interval";
}

/// Per-split values of one estimate by split index (absent where undefined).
inline std::map<std::size_t, double> by_split(const estimate& e) {
    std::map<std::size_t, double> v;
    for (const auto& s : e.per_split)
        if (s.value)
            v[s.index] = *s.value;
    return v;
}

inline std::string model_of(const estimate& e, std::size_t i) {
    return e.model.empty() ? "model " + std::to_string(i + 1) : e.model;
}

} // namespace detail_html

/// An HTML page built section by section; see the header comment.
class html_report {
public:
    explicit html_report(html_options o = {}) : o_(std::move(o)) {}

    /// A small two-column table (e.g. "data", "300 rows, 48 positive").
    html_report& facts(const std::vector<std::pair<std::string, std::string>>& rows,
                       std::string heading = "About this evaluation") {
        std::string b = "<table class=\"facts\">";
        for (const auto& [k, v] : rows)
            b += "<tr><th>" + detail_html::esc(k) + "</th><td>" + detail_html::esc(v) + "</td></tr>";
        add(std::move(heading), b + "</table>");
        return *this;
    }

    /// A paragraph of text, in the current section (or in a section of its own with a heading).
    html_report& text(std::string_view paragraph, std::string heading = "") {
        const std::string b = "<p>" + detail_html::esc(paragraph) + "</p>";
        if (heading.empty() && !sections_.empty())
            sections_.back().body += b;
        else
            add(heading.empty() ? std::string("Text") : std::move(heading), b);
        return *this;
    }

    /// The estimates table: model, measure, value, interval, method, splits, rows, notes.
    html_report& estimates(std::span<const estimate> es, std::string heading = "Estimates") {
        if (es.empty())
            detail::fail("heldout::report::html_report::estimates", "es", "empty input");
        const bool same_level =
            std::all_of(es.begin(), es.end(), [&](const estimate& e) { return e.level == es[0].level; });
        std::string b = "<table class=\"estimates\"><tr><th>model</th><th>measure</th><th>value</th><th>" +
                        (same_level ? detail_html::level_header(es[0].level) : std::string("interval (level)")) +
                        "</th><th>method</th><th>splits</th><th>test rows</th><th>notes</th></tr>";
        for (std::size_t i = 0; i < es.size(); ++i) {
            const estimate& e = es[i];
            b += "<tr><td>" + detail_html::esc(e.model.empty() ? "-" : e.model) + "</td><td>" +
                 detail_html::esc(e.measure) + "</td><td class=\"num\">" + value_text(e.value, e.lower, e.upper) +
                 "</td><td class=\"num\">" + interval_text(e.lower, e.upper) +
                 (same_level ? std::string() : " (" + detail_html::level_header(e.level) + ")") + "</td><td>" +
                 detail_html::esc(e.has_interval() ? e.method_label : e.method_label + ", point estimate") +
                 "</td><td class=\"num\">" + splits_text(e) + "</td><td class=\"num\">" +
                 std::to_string(e.observations) + "</td><td>" + detail_html::notes_cell(e.notes) + "</td></tr>";
        }
        add(std::move(heading),
            b + "</table><p class=\"sub\">Values are shown to the digits their intervals support (half-width to two "
                "significant digits); exports keep full precision.</p>");
        return *this;
    }

    /// The comparisons table: measure, A, B, A - B with its interval, statistic, p (and Holm's
    /// adjusted p when present), method, notes.
    html_report& comparisons(std::span<const comparison> cs, std::string heading = "Pairwise comparisons") {
        if (cs.empty())
            detail::fail("heldout::report::html_report::comparisons", "cs", "empty input");
        const bool holm =
            std::any_of(cs.begin(), cs.end(), [](const comparison& c) { return c.adjusted_p_value.has_value(); });
        std::string b = "<table class=\"comparisons\"><tr><th>measure</th><th>A</th><th>B</th><th>A &#8722; B</th>"
                        "<th>" +
                        detail_html::level_header(cs[0].level) + "</th><th>statistic</th><th>p</th>" +
                        (holm ? "<th>p, Holm-adjusted</th>" : "") + "<th>method</th><th>notes</th></tr>";
        for (const comparison& c : cs) {
            std::string stat = significant_text(c.statistic);
            if (c.df)
                stat += ", df " + significant_text(*c.df) + (c.df2 ? " and " + significant_text(*c.df2) : "");
            b += "<tr><td>" + detail_html::esc(c.measure) + "</td><td>" + detail_html::esc(c.model_a) + "</td><td>" +
                 detail_html::esc(c.model_b) + "</td><td class=\"num\">" + value_text(c.difference, c.lower, c.upper) +
                 "</td><td class=\"num\">" + interval_text(c.lower, c.upper) + "</td><td class=\"num\">" + stat +
                 "</td><td class=\"num\">" + p_text(c.p_value) + "</td>" +
                 (holm ? "<td class=\"num\">" + (c.adjusted_p_value ? p_text(*c.adjusted_p_value) : std::string("-")) +
                             "</td>"
                       : std::string()) +
                 "<td>" + detail_html::esc(c.method_label) + "</td><td>" + detail_html::notes_cell(c.notes) +
                 "</td></tr>";
        }
        add(std::move(heading), b + "</table><p class=\"sub\">A &#8722; B is the first model's value minus the "
                                    "second's, whatever the direction of the measure.</p>");
        return *this;
    }

    /// A figure: an SVG document (from report/plots.hpp or report/svg.hpp) with a caption. With
    /// a heading it opens a section; without, it joins the current one.
    html_report& figure(std::string_view svg_document, std::string_view caption, std::string heading = "") {
        const std::string b = "<figure>" + inline_svg(svg_document) + "<figcaption>" + detail_html::esc(caption) +
                              "</figcaption></figure>";
        if (heading.empty() && !sections_.empty())
            sections_.back().body += b;
        else
            add(heading.empty() ? std::string("Figure") : std::move(heading), b);
        ++figures_;
        return *this;
    }

    /// ROC and precision-recall curves of binary scores (truth 0/1, one score vector per model,
    /// higher = more likely 1), with each model's AUC and average precision in the legend.
    template <value_range T>
    html_report& curves(std::span<const std::string> names, const T& truth, std::span<const std::vector<double>> scores,
                        std::string subtitle = "", std::string heading = "ROC and precision-recall curves") {
        constexpr std::string_view who = "heldout::report::html_report::curves";
        detail::check_same_size(who, "scores", names.size(), scores.size(), "names");
        if (names.empty())
            detail::fail(who, "names", "empty input");
        std::vector<roc_series> roc;
        std::vector<pr_series> pr;
        std::size_t positives = 0, n = 0;
        for (const auto y : values_of(truth, who, "truth")) {
            positives += y == 1;
            ++n;
        }
        for (std::size_t m = 0; m < names.size(); ++m) {
            const double a = evaluate(measure::auc{}, truth, scores[m]);
            const double ap = evaluate(measure::average_precision{}, truth, scores[m]);
            roc.push_back(roc_series_of(names[m] + " (AUC " + number(a, 3) + ")", roc_points(truth, scores[m])));
            pr.push_back(pr_series_of(names[m] + " (AP " + number(ap, 3) + ")", pr_points(truth, scores[m])));
        }
        const double prevalence = n ? static_cast<double>(positives) / static_cast<double>(n) : 0;
        figure(roc_plot(roc, "ROC curves", subtitle),
               "True against false positive rate as the threshold falls; the dashed diagonal is a model that ranks at "
               "random. AUC in the legend: the share of (positive, negative) pairs ranked the right way.",
               std::move(heading));
        figure(pr_plot(pr, prevalence, "Precision-recall curves", subtitle),
               "Precision against recall, drawn as steps (the area under them is the average precision, AP, in the "
               "legend); the dashed line is the share of positives, " +
                   number(prevalence, 3) + ", which a random ranking reaches.");
        return *this;
    }

    /// The reliability diagram of binary probabilities (equal-width bins, Wilson intervals of
    /// the observed rates, a count histogram below), and a table of every bin.
    template <value_range T>
    html_report& reliability(std::span<const std::string> names, const T& truth,
                             std::span<const std::vector<double>> probabilities, std::size_t bins = 10,
                             double level = 0.95, std::string subtitle = "",
                             std::string heading = "Calibration (reliability diagram)") {
        constexpr std::string_view who = "heldout::report::html_report::reliability";
        detail::check_same_size(who, "probabilities", names.size(), probabilities.size(), "names");
        if (names.empty())
            detail::fail(who, "names", "empty input");
        std::vector<calibration_series> cal;
        for (std::size_t m = 0; m < names.size(); ++m)
            cal.push_back({names[m], reliability_bins(truth, probabilities[m], bins, level)});
        const std::string lh = detail_html::level_header(level);
        figure(calibration_plot(cal, "Calibration (reliability diagram)",
                                subtitle.empty() ? std::to_string(bins) + " equal-width bins; bars: Wilson " + lh + "s"
                                                 : subtitle),
               "Observed share of positives against the mean predicted probability in each bin; a calibrated model "
               "lies on the dashed diagonal. Vertical bars are Wilson " +
                   lh +
                   "s of the observed shares; the histogram below counts the predictions per bin: points resting "
                   "on few predictions are uncertain.",
               std::move(heading));
        std::string b =
            "<details><summary>Per-bin counts and intervals</summary><table class=\"bins\"><tr><th>model</th>"
            "<th>bin</th><th>predictions</th><th>positives</th><th>mean predicted</th><th>observed</th><th>" +
            lh + " (Wilson)</th></tr>";
        for (const auto& s : cal)
            for (const auto& bin : s.bins)
                b += "<tr><td>" + detail_html::esc(s.name) + "</td><td class=\"num\">" + (bin.index == 0 ? "[" : "(") +
                     number(bin.lower, 2) + ", " + number(bin.upper, 2) + "]</td><td class=\"num\">" +
                     std::to_string(bin.count) + "</td><td class=\"num\">" + std::to_string(bin.positives) +
                     "</td><td class=\"num\">" + number(bin.mean_probability, 3) + "</td><td class=\"num\">" +
                     value_text(bin.observed_rate, bin.rate_lower, bin.rate_upper) + "</td><td class=\"num\">" +
                     interval_text(bin.rate_lower, bin.rate_upper) + "</td></tr>";
        sections_.back().body += b + "</table></details>";
        return *this;
    }

    /// Per-split values of one measure for several models (estimates of the same measure, one
    /// per model, from the same splits): a strip plot of the values, and one of the paired
    /// differences (every pair, up to 6 pairs) with a line at 0. Splits undefined for a model
    /// are left out of its values and of its differences.
    html_report& per_split(std::span<const estimate> es, std::string heading = "") {
        constexpr std::string_view who = "heldout::report::html_report::per_split";
        if (es.empty())
            detail::fail(who, "es", "empty input");
        for (std::size_t i = 1; i < es.size(); ++i)
            if (es[i].measure != es[0].measure)
                detail::fail_at(
                    who, "es", "estimates of different measures ('" + es[i].measure + "', '" + es[0].measure + "')", i);
        std::vector<std::map<std::size_t, double>> values;
        std::vector<strip_group> groups;
        bool paired = true;
        for (std::size_t i = 0; i < es.size(); ++i) {
            values.push_back(detail_html::by_split(es[i]));
            strip_group g{detail_html::model_of(es[i], i), {}};
            for (const auto& [k, v] : values.back())
                g.values.push_back(v);
            if (g.values.empty())
                detail::fail_at(who, "es", "no defined per-split value", i);
            paired = paired && values.back().size() == values[0].size() &&
                     std::equal(values.back().begin(), values.back().end(), values[0].begin(),
                                [](const auto& a, const auto& b) { return a.first == b.first; });
            groups.push_back(std::move(g));
        }
        const std::size_t splits = values[0].size();
        const std::string title = es[0].measure + " per split";
        figure(strip_plot(groups, {.title = title,
                                   .value_label = es[0].measure,
                                   .subtitle = std::to_string(splits) + " splits; bars: means; boxes: quartiles",
                                   .paired = paired}),
               "Each point is the measure on one split's test rows; the black bar is the mean over splits (the "
               "estimate), the box spans the middle half. Splits share training rows, so their spread understates "
               "the uncertainty of the mean: the intervals above account for that.",
               heading.empty() ? title : std::move(heading));
        std::vector<strip_group> diffs;
        for (std::size_t i = 0; i < es.size(); ++i)
            for (std::size_t j = i + 1; j < es.size(); ++j) {
                strip_group d{groups[i].name + " \xE2\x88\x92 " + groups[j].name, {}};
                for (const auto& [k, v] : values[i])
                    if (const auto it = values[j].find(k); it != values[j].end())
                        d.values.push_back(v - it->second);
                if (!d.values.empty())
                    diffs.push_back(std::move(d));
            }
        if (!diffs.empty() && diffs.size() <= 6)
            figure(strip_plot(diffs, {.title = "Paired differences of " + es[0].measure + " per split",
                                      .value_label = "difference (first \xE2\x88\x92 second)",
                                      .subtitle = "the same split, both models; dashed line: no difference",
                                      .reference = 0.0}),
                   "Each point is the difference of two models on the same split: the pairing that the comparisons "
                   "use. Points on both sides of the dashed line mean the order of the models changes from split to "
                   "split.");
        return *this;
    }

    /// The critical-difference diagram of several models (3 or more) ranked on every split where
    /// all are defined: average ranks (1 = best by `better`), the Friedman test in its
    /// Iman-Davenport form and the Nemenyi critical difference at `alpha` (Demšar 2006,
    /// compare/friedman.hpp). Splits of one data set share rows, which the test assumes they do
    /// not (it was made for independent data sets): the caption says so.
    // A template only so that the Friedman and Nemenyi code (Boost.Math) is compiled where
    // ranks() is used, not in every translation unit that includes the report.
    template <class = void>
    html_report& ranks(std::span<const estimate> es, direction better, double alpha = 0.05, std::string heading = "") {
        constexpr std::string_view who = "heldout::report::html_report::ranks";
        if (es.size() < 3)
            detail::fail(who, "es", "the diagram needs 3 or more models, got " + std::to_string(es.size()));
        std::vector<std::map<std::size_t, double>> values;
        std::vector<std::string> names;
        for (std::size_t i = 0; i < es.size(); ++i) {
            values.push_back(detail_html::by_split(es[i]));
            names.push_back(detail_html::model_of(es[i], i));
        }
        std::vector<std::size_t> common;
        for (const auto& [k, v] : values[0])
            if (std::all_of(values.begin(), values.end(), [k = k](const auto& m) { return m.count(k) > 0; }))
                common.push_back(k);
        if (common.size() < 2)
            detail::fail_undefined(who, "fewer than 2 splits on which every model is defined");
        Eigen::MatrixXd table(static_cast<Eigen::Index>(common.size()), static_cast<Eigen::Index>(es.size()));
        for (std::size_t r = 0; r < common.size(); ++r)
            for (std::size_t m = 0; m < es.size(); ++m)
                table(static_cast<Eigen::Index>(r), static_cast<Eigen::Index>(m)) = values[m].at(common[r]);
        const friedman_result f = friedman_test(table, better, names);
        const double cd = nemenyi_critical_difference(es.size(), common.size(), alpha);
        const std::string title = "Average ranks on " + es[0].measure + " (1 = best)";
        figure(critical_difference_plot(names, f.average_ranks, cd, title,
                                        std::to_string(common.size()) + " splits; Nemenyi CD at alpha " +
                                            detail::note_number(alpha)),
               "Models ranked on each split (1 = best), ranks averaged. Thick bars join models whose average ranks "
               "differ by less than the critical difference CD (Nemenyi, after Dem\xC5\xA1"
               "ar 2006); Friedman test, Iman-Davenport F = " +
                   significant_text(f.f_statistic) + ", p = " + p_text(f.f_p_value) +
                   ". Caution: the splits share training and test rows, and the test assumes independent data sets, "
                   "so read the groups as a description of these splits, not as a test; the pairwise comparisons "
                   "above account for the overlap.",
               heading.empty() ? "Ranks of the models on " + es[0].measure : std::move(heading));
        return *this;
    }

    /// The confusion table of a classifier: counts of rows by true class (rows) and predicted
    /// class (columns), with totals; labels are 0..k-1, `classes` names them.
    template <label_range T, label_range P>
    html_report& confusion(std::string_view model, const T& truth, const P& predicted,
                           std::span<const std::string> classes, std::string heading = "") {
        constexpr std::string_view who = "heldout::report::html_report::confusion";
        auto t = values_of(truth, who, "truth");
        auto p = values_of(predicted, who, "predicted");
        detail::check_same_size(who, "predicted", t.size(), p.size(), "truth");
        const std::size_t k = classes.size();
        if (k < 2)
            detail::fail(who, "classes", "at least two classes are needed");
        std::vector<std::size_t> counts(k * k, 0);
        for (std::size_t i = 0; i < t.size(); ++i) {
            const auto ta = static_cast<long long>(t[i]), pa = static_cast<long long>(p[i]);
            if (ta < 0 || static_cast<unsigned long long>(ta) >= k)
                detail::fail_at(who, "truth", "label outside the classes 0.." + std::to_string(k - 1), i);
            if (pa < 0 || static_cast<unsigned long long>(pa) >= k)
                detail::fail_at(who, "predicted", "label outside the classes 0.." + std::to_string(k - 1), i);
            const auto a = static_cast<std::size_t>(ta), b = static_cast<std::size_t>(pa);
            ++counts[a * k + b];
        }
        std::string b = "<table class=\"confusion\"><tr><th>" + detail_html::esc(model) + ": true \\ predicted</th>";
        for (const auto& c : classes)
            b += "<th>" + detail_html::esc(c) + "</th>";
        b += "<th>total</th></tr>";
        for (std::size_t a = 0; a < k; ++a) {
            std::size_t total = 0;
            b += "<tr><th>" + detail_html::esc(classes[a]) + "</th>";
            for (std::size_t c = 0; c < k; ++c) {
                total += counts[a * k + c];
                b += std::string(a == c ? "<td class=\"num\"><b>" : "<td class=\"num\">") +
                     std::to_string(counts[a * k + c]) + (a == c ? "</b></td>" : "</td>");
            }
            b += "<td class=\"num\">" + std::to_string(total) + "</td></tr>";
        }
        b += "</table>";
        if (heading.empty() && !sections_.empty())
            sections_.back().body += b;
        else
            add(heading.empty() ? std::string("Confusion tables") : std::move(heading), b);
        return *this;
    }

    /// A list of notes (what the reader must know: undefined splits, clipped intervals, ...).
    html_report& notes(std::span<const std::string> items, std::string heading = "Notes") {
        if (items.empty())
            return *this;
        std::string b = "<ul>";
        for (const auto& n : items)
            b += "<li>" + detail_html::esc(n) + "</li>";
        add(std::move(heading), b + "</ul>");
        return *this;
    }

    /// Cautions beyond the standard ones, shown in the closing section.
    html_report& caution(std::string text) {
        extra_cautions_.push_back(std::move(text));
        return *this;
    }

    /// Number of figures added so far.
    std::size_t figure_count() const noexcept { return figures_; }

    /// The complete page.
    std::string str() const {
        std::string s = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>" +
                        detail_html::esc(o_.title) + "</title>\n<style>" + std::string(detail_html::css) +
                        "</style>\n</head>\n<body>\n<header><h1>" + detail_html::esc(o_.title) + "</h1>";
        if (!o_.subtitle.empty())
            s += "<p class=\"sub\">" + detail_html::esc(o_.subtitle) + "</p>";
        s += "</header>\n<nav><ol>";
        for (const auto& sec : sections_)
            s += "<li><a href=\"#" + sec.id + "\">" + detail_html::esc(sec.heading) + "</a></li>";
        if (o_.cautions)
            s += "<li><a href=\"#cautions\">Cautions</a></li>";
        s += "</ol></nav>\n";
        for (const auto& sec : sections_)
            s += "<section id=\"" + sec.id + "\">\n<h2>" + detail_html::esc(sec.heading) + "</h2>\n" + sec.body +
                 "\n</section>\n";
        if (o_.cautions) {
            s += "<section id=\"cautions\">\n<h2>Cautions</h2>\n<div class=\"caution\"><ul>";
            for (const auto& c : standard_cautions())
                s += "<li>" + detail_html::esc(c) + "</li>";
            for (const auto& c : extra_cautions_)
                s += "<li>" + detail_html::esc(c) + "</li>";
            s += "</ul></div>\n</section>\n";
        }
        s += "<footer>Made with heldout " + std::to_string(HELDOUT_VERSION_MAJOR) + "." +
             std::to_string(HELDOUT_VERSION_MINOR) + "." + std::to_string(HELDOUT_VERSION_PATCH) +
             ". One self-contained file: inline SVG and CSS, no scripts, no external "
             "files.</footer>\n</body>\n</html>\n";
        return s;
    }

    /// Writes the page to a file (std::runtime_error naming the path when that fails).
    void save(const std::string& path) const { report::save(str(), path); }

private:
    struct section {
        std::string id, heading, body;
    };

    void add(std::string heading, std::string body) {
        sections_.push_back({"s" + std::to_string(sections_.size() + 1), std::move(heading), std::move(body)});
    }

    static std::string splits_text(const estimate& e) {
        const std::size_t recorded = e.per_split.size();
        if (recorded == e.splits)
            return std::to_string(e.splits);
        return std::to_string(e.splits) + " of " + std::to_string(recorded);
    }

    html_options o_;
    std::vector<section> sections_;
    std::vector<std::string> extra_cautions_;
    std::size_t figures_ = 0;
};

} // namespace report
HELDOUT_NAMESPACE_END
