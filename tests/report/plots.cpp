// Tests for heldout/report/plots.hpp: reliability bins, the four plots, CD groups.
// Well-formedness is checked by the small XML parser in tests/report/xml_check.hpp.
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/roc_points.hpp>
#include <heldout/report/plots.hpp>

#include "report/xml_check.hpp"

#include "support/text.hpp"
#include <doctest/doctest.h>

#include <array>
#include <cstdint>
#include <limits>
#include <random>
#include <string>
#include <vector>

using namespace heldout::report;
using heldout_test::xml_problem;

namespace {
using heldout_test::count_of;
} // namespace

TEST_SUITE("report/plots") {
    TEST_CASE("reliability bins: a worked example with M = 5 (Naeini et al. 2015 equal-width bins)") {
        // Bins [0, .2], (.2, .4], (.4, .6], (.6, .8], (.8, 1]; contents worked by hand:
        //   [0, .2]:   .18(0) .08(0) .03(0)  -> n 3, mean .29/3,  rate 0
        //   (.4, .6]:  .52(0) .42(1)         -> n 2, mean .47,    rate .5
        //   (.6, .8]:  .75(1) .62(1) .71(0)  -> n 3, mean 2.08/3, rate 2/3
        //   (.8, 1]:   .92(1) .99(1)         -> n 2, mean .955,   rate 1
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        const auto b = reliability_bins(y, p, 5);
        REQUIRE(b.size() == 4);
        CHECK(b[0].index == 0);
        CHECK(b[0].count == 3);
        CHECK(b[0].mean_probability == doctest::Approx(0.29 / 3));
        CHECK(b[0].observed_rate == 0);
        CHECK(b[1].index == 2);
        CHECK(b[1].count == 2);
        CHECK(b[1].mean_probability == doctest::Approx(0.47));
        CHECK(b[1].observed_rate == 0.5);
        CHECK(b[2].index == 3);
        CHECK(b[2].mean_probability == doctest::Approx(2.08 / 3));
        CHECK(b[2].observed_rate == doctest::Approx(2.0 / 3));
        CHECK(b[3].index == 4);
        CHECK(b[3].lower == doctest::Approx(0.8));
        CHECK(b[3].upper == 1);
        CHECK(b[3].observed_rate == 1);
        // The weighted gap |rate - mean| over the bins is the expected calibration error of
        // Naeini et al. (2015): (3*.09667 + 2*.03 + 3*.02667 + 2*.045)/10 = 0.052 (by hand).
        double ece = 0;
        for (const auto& bin : b)
            ece += static_cast<double>(bin.count) / 10.0 * std::abs(bin.observed_rate - bin.mean_probability);
        CHECK(ece == doctest::Approx(0.052).epsilon(1e-12));
    }

    TEST_CASE("reliability bins: values on edges go to the lower bin, 0 to the first") {
        // 0.07 * 100 = 7.000000000000001 in floating point: a ceil-based index puts it in
        // bin 8 (0-based 7); by the definition (0.06, 0.07] it belongs to bin 7 (0-based 6).
        const std::vector<int> y{0, 1, 0, 1, 1};
        const std::vector<double> p{0.07, 0.55, 0.0, 1.0, 0.56};
        const auto b = reliability_bins(y, p, 100);
        REQUIRE(b.size() == 5);
        CHECK(b[0].index == 0);  // p = 0
        CHECK(b[1].index == 6);  // 0.07
        CHECK(b[2].index == 54); // 0.55 in (0.54, 0.55]
        CHECK(b[3].index == 55); // 0.56 in (0.55, 0.56]
        CHECK(b[4].index == 99); // 1.0
        // brute force over a grid: every probability p lies in (lower, upper] of its bin
        std::mt19937_64 g(7); // test data only
        std::uniform_int_distribution<int> d(0, 1000);
        std::vector<double> q(2000);
        std::vector<int> t(2000);
        for (std::size_t i = 0; i < q.size(); ++i) {
            q[i] = d(g) / 1000.0;
            t[i] = d(g) % 2;
        }
        for (std::size_t m : {1u, 3u, 7u, 10u, 15u, 50u, 100u}) {
            std::size_t total = 0;
            for (const auto& bin : reliability_bins(t, q, m)) {
                total += bin.count;
                std::size_t inside = 0;
                for (double x : q)
                    inside += (x > bin.lower || (bin.index == 0 && x == 0)) && x <= bin.upper;
                CHECK(inside == bin.count);
            }
            CHECK(total == q.size());
        }
    }

    TEST_CASE("reliability bins: bad input names the argument and index") {
        const std::vector<int> y{0, 2};
        const std::vector<double> p{0.1, 0.2};
        CHECK_THROWS_WITH_AS(
            reliability_bins(y, p),
            "heldout::report::reliability_bins: argument 'truth': label outside the classes 0..1 at index 1",
            heldout::input_error);
        const std::vector<int> ok{0, 1};
        const std::vector<double> q{0.1, 1.5};
        CHECK_THROWS_WITH_AS(
            reliability_bins(ok, q),
            "heldout::report::reliability_bins: argument 'probability': probability 1.5 outside [0, 1] "
            "at index 1",
            heldout::input_error);
        CHECK_THROWS_AS(reliability_bins(ok, p, 0), heldout::input_error);
        const std::vector<double> shorter{0.1};
        CHECK_THROWS_AS(reliability_bins(ok, shorter), heldout::input_error);
    }

    TEST_CASE("ROC plot: unit square, diagonal, one curve per model, corners added") {
        struct point {
            double fpr, tpr, threshold;
        };
        const std::vector<point> pts{{0, 0, 2}, {0, 0.5, 0.9}, {0.25, 0.75, 0.6}, {0.5, 1, 0.3}};
        struct soa {
            std::vector<double> fpr{0.1, 0.6}, tpr{0.4, 0.9};
        } other;
        struct long_names { // the member names of heldout::roc_point
            double false_positive_rate, true_positive_rate, threshold;
        };
        const std::vector<long_names> named{{0, 0, 1}, {0.5, 0.75, 0.5}, {1, 1, 0}};
        const std::vector<roc_series> curves{roc_series_of("logistic <IRLS>", pts), roc_series_of("k-NN", other)};
        CHECK(curves[0].fpr.size() == 4);
        CHECK(curves[1].tpr[1] == 0.9);
        const roc_series third = roc_series_of("x", named);
        CHECK(third.fpr == std::vector<double>{0, 0.5, 1});
        CHECK(third.tpr == std::vector<double>{0, 0.75, 1});
        const std::string s = roc_plot(curves, "ROC & friends");
        REQUIRE(xml_problem(s).empty());
        CHECK(count_of(s, "<polyline") == 3); // diagonal + two curves
        CHECK(s.find("logistic &lt;IRLS&gt;") != std::string::npos);
        CHECK(s.find(">false positive rate (1 - specificity)<") != std::string::npos);
        CHECK(s.find(">0.0<") != std::string::npos);
        CHECK(s.find(">1.0<") != std::string::npos);
        // the first curve gains the (1, 1) corner, the second both corners: 5 and 4 points
        const auto first = s.find("<polyline", s.find("<polyline") + 1);
        const auto line = s.substr(first, s.find("/>", first) - first);
        CHECK(count_of(line, ",") == 5);
        const std::vector<roc_series> bad{{"x", {0, 1.5}, {0, 1}}};
        CHECK_THROWS_WITH_AS(roc_plot(bad),
                             "heldout::report::roc_plot: argument 'curves[0].fpr': probability 1.5 outside [0, 1] at "
                             "index 1",
                             heldout::input_error);
        CHECK_THROWS_AS(roc_plot(std::vector<roc_series>{}), heldout::input_error);
    }

    TEST_CASE("reliability bins: Wilson intervals of the observed rates") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        const auto b = reliability_bins(y, p, 5, 0.9);
        REQUIRE(b.size() == 4);
        for (const auto& bin : b) {
            const auto w = heldout::wilson_interval(bin.positives, bin.count, 0.9);
            CHECK(bin.rate_lower == w.lower);
            CHECK(bin.rate_upper == w.upper);
            CHECK(bin.rate_lower <= bin.observed_rate);
            CHECK(bin.observed_rate <= bin.rate_upper);
        }
        // (.6, .8]: 2 of 3 positive. Wilson (1927) at z = 1.6449 (z^2 = 2.7055): centre
        // (2 + z^2/2)/(3 + z^2) = 3.3528/5.7055 = 0.5876, half-width z sqrt(2*1/3 + z^2/4)/(3 + z^2)
        // = 1.6449 * 1.1589/5.7055 = 0.3341 -> [0.2535, 0.9217] (by hand).
        CHECK(b[2].positives == 2);
        CHECK(b[2].rate_lower == doctest::Approx(0.2535).epsilon(4e-4));
        CHECK(b[2].rate_upper == doctest::Approx(0.9217).epsilon(4e-4));
        CHECK_THROWS_AS(reliability_bins(y, p, 5, 1.0), heldout::input_error);
    }

    TEST_CASE("calibration plot: reliability panel with intervals above a count histogram") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        const auto b5 = reliability_bins(y, p, 5);
        const auto b10 = reliability_bins(y, p, 10);
        const std::vector<calibration_series> models{{"A", b5}, {"B", b10}};
        const std::string s = calibration_plot(models);
        REQUIRE(xml_problem(s).empty());
        CHECK(count_of(s, "<svg") == 3); // the document and its two panels
        // polylines: diagonal and the two model lines; circles: markers + legend markers
        CHECK(count_of(s, "<polyline") == 1 + 2);
        CHECK(count_of(s, "<circle") == b5.size() + b10.size() + 2);
        // the bins and whiskers are heldout::reliability's
        const auto r = heldout::reliability(y, p, 10);
        REQUIRE(r.size() == b10.size());
        CHECK(b10[2].rate_lower == r[2].lower);
        CHECK(b10[2].rate_upper == r[2].upper);
        CHECK(s.find(">observed frequency of the event<") != std::string::npos);
        CHECK(s.find(">predictions<") != std::string::npos);
        // one histogram bar per bin and model, its height proportional to the bin's count
        // and inside the bin's edges (the bars were once scaled by a guessed plot width)
        // (read with find, not std::regex: g++ 12's <regex> trips -Wmaybe-uninitialized under
        // the sanitizers)
        std::vector<std::array<double, 4>> bars_a, bars_b;
        auto attribute = [](const std::string& tag, const std::string& name) {
            const std::size_t at = tag.find(" " + name + "=\"");
            REQUIRE(at != std::string::npos);
            const std::size_t from = at + name.size() + 3;
            return tag.substr(from, tag.find('"', from) - from);
        };
        for (std::size_t at = s.find("<rect "); at != std::string::npos; at = s.find("<rect ", at + 1)) {
            const std::string tag = s.substr(at, s.find("/>", at) + 2 - at);
            if (tag.find(" stroke=\"none\"") == std::string::npos ||
                tag.find(" opacity=\"0.80\"/>") == std::string::npos)
                continue;
            const std::array<double, 4> r{std::stod(attribute(tag, "x")), std::stod(attribute(tag, "y")),
                                          std::stod(attribute(tag, "width")), std::stod(attribute(tag, "height"))};
            (attribute(tag, "fill") == palette(0) ? bars_a : bars_b).push_back(r);
        }
        REQUIRE(bars_a.size() == b5.size());
        REQUIRE(bars_b.size() == b10.size());
        const double unit = bars_a[0][3] / static_cast<double>(b5[0].count); // pixels per prediction
        for (std::size_t i = 0; i < b5.size(); ++i)
            CHECK(bars_a[i][3] == doctest::Approx(unit * static_cast<double>(b5[i].count)).epsilon(0.01));
        for (std::size_t i = 0; i < b10.size(); ++i)
            CHECK(bars_b[i][3] == doctest::Approx(unit * static_cast<double>(b10[i].count)).epsilon(0.01));
        // widths: 0.8 of a bin shared by 2 models; bins of 0.2 and 0.1 -> widths in ratio 2:1
        CHECK(bars_a[0][2] == doctest::Approx(2 * bars_b[0][2]).epsilon(0.01));
        for (std::size_t i = 1; i < b5.size(); ++i) // bars of model A do not overlap
            CHECK(bars_a[i][0] >= bars_a[i - 1][0] + bars_a[i - 1][2]);
        CHECK_THROWS_AS(calibration_plot(std::vector<calibration_series>{{"empty", {}}}), heldout::input_error);
    }

    TEST_CASE("precision-recall plot: steps whose area is the average precision") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        const auto s = pr_series_of("model <A>", heldout::pr_points(y, p));
        // Area under the drawn steps = sum (r_i - r_{i-1}) p_i, the average precision.
        double area = 0, last = 0;
        for (std::size_t i = 0; i < s.recall.size(); ++i) {
            area += (s.recall[i] - last) * s.precision[i];
            last = s.recall[i];
        }
        CHECK(area == doctest::Approx(heldout::evaluate(heldout::measure::average_precision{}, y, p)).epsilon(1e-12));
        const std::vector<pr_series> curves{s};
        const std::string svg = pr_plot(curves, 0.5);
        REQUIRE(xml_problem(svg).empty());
        CHECK(count_of(svg, "<polyline") == 2); // the prevalence line and the curve
        CHECK(svg.find("model &lt;A&gt;") != std::string::npos);
        const std::vector<pr_series> bad{{"x", {0.5, 0.2}, {1, 1}}};
        CHECK_THROWS_AS(pr_plot(bad), heldout::input_error);
    }

    TEST_CASE("strip plot: jittered points per group, a mean bar each, paired lines, reproducible") {
        const std::vector<strip_group> g{{"logistic", {0.10, 0.12, 0.08, 0.11}}, {"k-NN", {0.14, 0.13, 0.15, 0.12}}};
        const std::string s = strip_plot(g, {.title = "Error per fold", .value_label = "error", .paired = true});
        REQUIRE(xml_problem(s).empty());
        CHECK(count_of(s, "<circle") == 8);
        CHECK(count_of(s, "<polyline") == 4 + 2); // paired lines + mean bars
        CHECK(s.find(">logistic<") != std::string::npos);
        CHECK(s.find(">k-NN<") != std::string::npos);
        CHECK(strip_plot(g, {.paired = true}) == strip_plot(g, {.paired = true}));
        CHECK(strip_plot(g, {.seed = 1}) != strip_plot(g, {.seed = 2}));
        const std::vector<strip_group> uneven{{"a", {1, 2}}, {"b", {1}}};
        CHECK_THROWS_WITH_AS(strip_plot(uneven, {.paired = true}),
                             "heldout::report::strip_plot: argument 'groups[1]': paired groups must hold the same "
                             "number of values",
                             heldout::input_error);
        // 100 splits: no paired lines (they would tangle), quartile boxes, translucent points
        strip_group many_a{"a", {}}, many_b{"b", {}};
        for (int i = 0; i < 100; ++i) {
            many_a.values.push_back(0.1 + 0.001 * i);
            many_b.values.push_back(0.12 + 0.0005 * i);
        }
        const std::vector<strip_group> many{many_a, many_b};
        const std::string m = strip_plot(many, {.paired = true, .reference = 0.0});
        REQUIRE(xml_problem(m).empty());
        CHECK(count_of(m, "<circle") == 200);
        CHECK(count_of(m, "<polyline") == 1 + 2);    // the reference line and two mean bars
        CHECK(count_of(m, "opacity=\"0.18\"") == 2); // two quartile boxes
        CHECK(count_of(m, "opacity=\"0.55\"") == 200);
        const std::vector<strip_group> nan{{"a", {1, std::numeric_limits<double>::quiet_NaN()}}};
        CHECK_THROWS_WITH_AS(strip_plot(nan),
                             "heldout::report::strip_plot: argument 'groups[0].values': not finite (nan) at index 1",
                             heldout::input_error);
    }

    TEST_CASE("critical-difference groups: maximal runs of ranks closer than CD (brute force)") {
        // Demšar (2006) style example: ranks 1.25, 2.1667, 2.5833 with CD 1.3531 (k = 3,
        // N = 6, alpha = 0.05): the spread 1.3333 < CD, so one group holds all three.
        const std::vector<double> r3{1.25, 2.1666666666666667, 2.5833333333333333};
        auto g = critical_difference_groups(r3, 1.35313616533);
        REQUIRE(g.size() == 1);
        CHECK(g[0] == std::pair<std::size_t, std::size_t>{0, 2});
        // A smaller CD splits them: {0,1} (0.9167) and {1,2} (0.4167), not {0,2} (1.3333).
        g = critical_difference_groups(r3, 1.0);
        REQUIRE(g.size() == 2);
        CHECK(g[0] == std::pair<std::size_t, std::size_t>{0, 1});
        CHECK(g[1] == std::pair<std::size_t, std::size_t>{1, 2});
        CHECK(critical_difference_groups(r3, 0.1).empty());
        // brute force on random sorted ranks: a pair (i, j) is in some group iff r_j - r_i < cd
        std::mt19937_64 gen(11); // test data only
        std::uniform_real_distribution<double> u(1, 8);
        for (int rep = 0; rep < 300; ++rep) {
            std::vector<double> r(2 + rep % 7);
            for (auto& x : r)
                x = u(gen);
            std::sort(r.begin(), r.end());
            const double cd = 0.2 + u(gen) / 3;
            const auto groups = critical_difference_groups(r, cd);
            for (std::size_t i = 0; i < r.size(); ++i)
                for (std::size_t j = i + 1; j < r.size(); ++j) {
                    bool covered = false;
                    for (auto [a, b] : groups)
                        covered = covered || (a <= i && j <= b);
                    CHECK(covered == (r[j] - r[i] < cd));
                }
            for (std::size_t q = 1; q < groups.size(); ++q) { // maximal and ordered
                CHECK(groups[q].first > groups[q - 1].first);
                CHECK(groups[q].second > groups[q - 1].second);
            }
        }
        const std::vector<double> unsorted{2, 1};
        CHECK_THROWS_AS(critical_difference_groups(unsorted, 1), heldout::input_error);
    }

    TEST_CASE("critical-difference plot: names with ranks, a CD bar, group bars") {
        const std::vector<std::string> names{"logistic", "k-NN & co", "baseline"};
        const std::vector<double> ranks{2.1666666666666667, 1.25, 2.5833333333333333};
        const std::string s = critical_difference_plot(names, ranks, 1.35313616533, "Friedman ranks");
        REQUIRE(xml_problem(s).empty());
        CHECK(s.find(">CD = 1.35<") != std::string::npos);
        CHECK(s.find(">k-NN &amp; co (1.25)<") != std::string::npos);
        CHECK(s.find(">logistic (2.17)<") != std::string::npos);
        CHECK(count_of(s, "stroke=\"#D55E00\"") == 1); // one group bar
        CHECK(count_of(s, "<polyline") == 3);          // one leader line per model
        const std::vector<double> bad{0.5, 1, 2};
        CHECK_THROWS_WITH_AS(critical_difference_plot(names, bad, 1),
                             "heldout::report::critical_difference_plot: argument 'average_ranks': rank outside [1, "
                             "number of models] at index 0",
                             heldout::input_error);
        CHECK_THROWS_AS(critical_difference_plot(names, ranks, 0), heldout::input_error);
    }
}
