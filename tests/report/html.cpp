// Tests for heldout/report/html.hpp and report/numbers.hpp: the self-contained page (every
// section, figure and caution present, text escaped, nothing external) and the digits rule.
// The page is also loaded in headless chromium by the ctest report.browser (tests/browser).
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/report/html.hpp>
#include <heldout/report/numbers.hpp>

#include "report/xml_check.hpp"
#include "support/three_scorers.hpp"

#include "support/text.hpp"
#include <doctest/doctest.h>

#include <cstdint>
#include <string>
#include <vector>

using namespace heldout::report;

namespace {
using heldout_test::count_of;

/// Three scorers of 200 rows on 2 x 5-fold CV, with kept predictions: data for every section.
struct three_models : heldout_test::three_scorers {
    three_models() : three_scorers(200, 11, heldout::repeated_kfold{.folds = 5, .repeats = 2, .seed = 4}) {}
};
} // namespace

TEST_SUITE("report/html") {
    TEST_CASE("numbers for people: digits from the interval's half-width") {
        CHECK(interval_decimals(0.7342, 0.8251) == 3); // half-width 0.0455: 2 digits at 3 decimals
        CHECK(interval_decimals(0.12, 0.14) == 3);     // 0.01 -> 0.010
        CHECK(interval_decimals(10, 30) == 0);         // 10 -> 10
        CHECK(interval_decimals(1000, 3000) == 0);     // never negative
        CHECK(interval_decimals(0.5, 0.5) == 4);       // no width
        CHECK(estimate_text(0.77966, 0.7342, 0.8251) == "0.780 [0.734, 0.825]");
        CHECK(estimate_text(0.0123456, 0.0101, 0.0145) == "0.0123 [0.0101, 0.0145]");
        CHECK(estimate_text(0.123456, std::nullopt, std::nullopt) == "0.1235");
        CHECK(significant_text(123456.7) == "123457");
        CHECK(significant_text(0.000012345) == "1.234e-05");
        CHECK(significant_text(-0.5) == "-0.5000");
        CHECK(p_text(0.00003) == "< 0.0001");
        CHECK(p_text(0.0437) == "0.044");
        CHECK(p_text(0.31) == "0.31");
        CHECK(p_text(0.999) == "1");
        CHECK(p_text(0.00031) == "0.00031");
        CHECK_THROWS_AS(p_text(1.5), heldout::input_error);
        CHECK_THROWS_AS(interval_decimals(0, std::numeric_limits<double>::infinity()), heldout::input_error);
    }

    TEST_CASE("a page with every section: self-contained, escaped, cautions included") {
        three_models d;
        std::vector<heldout::estimate> auc, all;
        for (const auto& a : d.aggs) {
            auc.push_back(a.estimate(heldout::measure::auc{}));
            all.push_back(a.estimate(heldout::measure::brier_score{}));
            all.push_back(auc.back());
        }
        const auto cmp =
            heldout::compare_all_pairs(std::span<const heldout::aggregator>(d.aggs), heldout::measure::auc{});
        html_report page({.title = "Three <models>", .subtitle = "2 x 5-fold CV & 200 rows"});
        page.facts({{"data", "200 rows"}, {"plan", "2 x 5-fold"}});
        page.estimates(all);
        page.comparisons(cmp);
        page.curves(d.names, d.y, d.p);
        page.reliability(d.names, d.y, d.p, 10);
        page.per_split(auc);
        page.ranks(auc, heldout::direction::higher_is_better);
        const std::vector<std::uint8_t> labels(d.y.begin(), d.y.end());
        std::vector<std::uint8_t> decided;
        for (const double q : d.p[0])
            decided.push_back(q >= 0.5);
        const std::vector<std::string> classes{"no", "yes"};
        page.confusion(d.names[0], labels, decided, classes);
        const std::vector<std::string> notes{"a note with <angle> & ampersand"};
        page.notes(notes);
        page.caution("an extra caution");
        const std::string s = page.str();

        CHECK(s.rfind("<!DOCTYPE html>\n<html lang=\"en\">", 0) == 0);
        CHECK(s.find("<meta charset=\"utf-8\">") != std::string::npos);
        // figures: ROC, PR, reliability, values per split, differences per split, CD diagram
        CHECK(page.figure_count() == 6);
        CHECK(count_of(s, "<figure>") == 6);
        // every figure inline: the reliability diagram nests two panels in one document
        CHECK(count_of(s, "<svg ") == 6 + 2);
        CHECK(s.find("<?xml") == std::string::npos);
        // nothing external: no scripts, no links out, no sources; the only URL is SVG's namespace
        CHECK(s.find("<script") == std::string::npos);
        CHECK(s.find("src=") == std::string::npos);
        CHECK(s.find("<link") == std::string::npos);
        CHECK(s.find("url(") == std::string::npos);
        CHECK(count_of(s, "http") == count_of(s, "http://www.w3.org/2000/svg"));
        // escaped everywhere: title, names, notes
        CHECK(s.find("<title>Three &lt;models&gt;</title>") != std::string::npos);
        CHECK(s.find("2 x 5-fold CV &amp; 200 rows") != std::string::npos);
        CHECK(s.find("logistic <IRLS>") == std::string::npos);
        CHECK(s.find("logistic &lt;IRLS&gt;") != std::string::npos);
        CHECK(s.find("a note with &lt;angle&gt; &amp; ampersand") != std::string::npos);
        // the standard cautions (README's) and the extra one
        for (const auto& c : standard_cautions())
            CHECK(s.find(xml_escape(c)) != std::string::npos);
        CHECK(s.find("an extra caution") != std::string::npos);
        // the estimates table shows each value at its interval's digits, the method and the model
        const auto& e = auc[0];
        CHECK(s.find("<td class=\"num\">" + estimate_text(e.value, e.lower, e.upper).substr(0, 5)) !=
              std::string::npos);
        CHECK(s.find(interval_text(e.lower, e.upper)) != std::string::npos);
        CHECK(s.find(">corrected t (Nadeau-Bengio)<") != std::string::npos);
        CHECK(count_of(s, "<table class=\"estimates\">") == 1);
        CHECK(count_of(s, "<tr><td>k-NN</td><td>") == 2);
        // comparisons: 3 pairs, Holm-adjusted column
        CHECK(s.find("<th>p, Holm-adjusted</th>") != std::string::npos);
        CHECK(count_of(s, "<tr><td>AUC</td>") == 3);
        // the reliability table: one row per non-empty bin and model
        std::size_t bins = 0;
        for (std::size_t m = 0; m < 3; ++m)
            bins += reliability_bins(d.y, d.p[m], 10).size();
        const auto table = s.substr(s.find("<table class=\"bins\">"));
        CHECK(count_of(table.substr(0, table.find("</table>")), "<tr>") == bins + 1);
        // confusion table totals: the row totals are the class counts
        std::size_t positives = 0;
        for (auto v : d.y)
            positives += v;
        CHECK(s.find("<td class=\"num\">" + std::to_string(positives) + "</td></tr></table>") != std::string::npos);
        // every SVG document in the page is well-formed XML
        for (std::size_t at = s.find("<svg "); at != std::string::npos;) {
            const std::size_t end = s.find("</figure>", at);
            const std::string doc = s.substr(at, s.rfind("</svg>", end) + 6 - at);
            CHECK(heldout_test::xml_problem(doc).empty());
            at = s.find("<figure>", end);
            at = at == std::string::npos ? at : s.find("<svg ", at);
        }
        CHECK(page.str() == s); // reproducible
    }

    TEST_CASE("refusals name the argument") {
        three_models d;
        std::vector<heldout::estimate> two{d.aggs[0].estimate(heldout::measure::auc{}),
                                           d.aggs[1].estimate(heldout::measure::auc{})};
        html_report page;
        CHECK_THROWS_WITH_AS(page.ranks(two, heldout::direction::higher_is_better),
                             "heldout::report::html_report::ranks: argument 'es': the diagram needs 3 or more models, "
                             "got 2",
                             heldout::input_error);
        two[1] = d.aggs[1].estimate(heldout::measure::brier_score{});
        CHECK_THROWS_AS(page.per_split(two), heldout::input_error);
        CHECK_THROWS_AS(page.estimates(std::vector<heldout::estimate>{}), heldout::input_error);
        const std::vector<std::string> one{"a"};
        CHECK_THROWS_AS(page.curves(one, d.y, std::span<const std::vector<double>>(d.p)), heldout::input_error);
    }
}
