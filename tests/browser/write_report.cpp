// Writes the HTML report that the ctest report.browser loads in headless chromium: every
// section and every figure html_report draws, from a seeded scenario through the library
// (three scorers of 400 rows, 10 x 10-fold CV: 100 splits, so the per-split figures are drawn
// at the size the issue asks to stay readable). Usage: heldout_report_page OUT.html
// Prints "figures N svgs M" on stdout: what the browser must find rendered.
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/report/html.hpp>

#include "support/three_scorers.hpp"

#include <algorithm>
#include <cstdint>
#include <exception>
#include <iostream>
#include <span>
#include <string>
#include <vector>

int main(int argc, char** argv) {
    if (argc != 2) {
        std::cerr << "usage: heldout_report_page OUT.html\n";
        return 2;
    }
    try {
        // 10 x 10-fold CV: 100 splits, the size at which the per-split figures must stay readable.
        heldout_test::three_scorers d(400, 2026, heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = 7});
        const auto& names = d.names;
        const auto& y = d.y;
        const auto& p = d.p;
        const auto& aggs = d.aggs;
        std::vector<heldout::estimate> auc, all;
        for (const auto& a : aggs) {
            auc.push_back(a.estimate(heldout::measure::auc{}));
            all.push_back(a.estimate(heldout::measure::brier_score{}));
            all.push_back(auc.back());
        }
        heldout::report::html_report page(
            {.title = "Three scorers <browser test>", .subtitle = "10 x 10-fold CV, 400 rows, seed 2026"});
        page.facts({{"data", "400 rows, simulated"}, {"plan", "10 x 10-fold CV"}});
        page.estimates(all);
        page.comparisons(
            heldout::compare_all_pairs(std::span<const heldout::aggregator>(aggs), heldout::measure::auc{}));
        page.curves(names, y, std::span<const std::vector<double>>(p));
        page.reliability(names, y, std::span<const std::vector<double>>(p), 10);
        page.per_split(auc);
        page.ranks(auc, heldout::direction::higher_is_better);
        std::vector<std::uint8_t> decided;
        for (const double q : p[0])
            decided.push_back(q >= 0.5);
        const std::vector<std::string> classes{"no", "yes"};
        page.confusion(names[0], y, decided, classes);
        const std::vector<std::string> notes{"a note with <angle> & ampersand"};
        page.notes(notes);
        page.caution("an extra caution");
        page.save(argv[1]);
        const std::string s = page.str();
        std::size_t svgs = 0;
        for (auto at = s.find("<svg "); at != std::string::npos; at = s.find("<svg ", at + 1))
            ++svgs;
        std::cout << "figures " << page.figure_count() << " svgs " << svgs << "\n";
    } catch (const std::exception& e) {
        std::cerr << "heldout_report_page: " << e.what() << "\n";
        return 1;
    }
    return 0;
}
