// Issue 16, item 6: an estimate and a comparison say how they were made (method, level,
// splits, rows, model names and every caution) in the printed line, the JSON and the CSV
// alike. Made through the real pipeline (a plan, evaluate_splits, estimate, compare), not
// by filling the structs by hand, so a path that drops a field on the way fails here.
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/plan/subsampling.hpp>

#include "support/text.hpp"
#include <doctest/doctest.h>

#include <map>
#include <sstream>
#include <string>
#include <vector>

namespace {

using heldout_test::has;

// 40 rows, y = row index mod 7; the "model" predicts the training mean plus a shift, so two
// models differ by a known amount on every split.
heldout::aggregator fitted(double shift, const char* name) {
    std::vector<double> y(40);
    for (std::size_t i = 0; i < y.size(); ++i)
        y[i] = static_cast<double>(i % 7);
    auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
        double m = 0;
        for (auto r : train)
            m += y[r];
        m /= static_cast<double>(train.size());
        return std::vector<double>(test.size(), m + shift);
    };
    auto a = heldout::evaluate_splits(heldout::subsampling{.repeats = 8, .test_count = 10, .seed = 4}.splits(40), y,
                                      fit, heldout::measure::mse{});
    a.set_model(name);
    return a;
}

// The CSV data row (second line) split at commas outside quotes.
std::vector<std::string> csv_row(const std::string& csv, std::size_t line = 1) {
    std::istringstream is(csv);
    std::string s;
    for (std::size_t i = 0; i <= line; ++i)
        std::getline(is, s);
    std::vector<std::string> out(1);
    bool quoted = false;
    for (char ch : s) {
        if (ch == '"')
            quoted = !quoted;
        else if (ch == ',' && !quoted)
            out.emplace_back();
        else
            out.back() += ch;
    }
    return out;
}

} // namespace

TEST_SUITE("estimate/provenance") {
    TEST_CASE("an estimate over splits: method, level, splits, rows, model and caution everywhere") {
        const auto a = fitted(0.0, "mean");
        const auto e = a.estimate(heldout::measure::mse{}, heldout::ci::naive_t, 0.9);
        REQUIRE(e.cautions.size() == 1); // the naive t carries its caution (estimators.hpp)
        std::ostringstream line;
        line << e;
        const std::string t = line.str();
        CHECK(t.rfind("mean: MSE ", 0) == 0);
        CHECK(has(t, "] 90% " + e.method_label + ", 8 splits, n=80; caution: " + e.cautions[0]));

        const std::string j = heldout::to_json(e);
        CHECK(has(j, "\"model\":\"mean\""));
        CHECK(has(j, "\"method\":\"naive_t\""));
        CHECK(has(j, "\"level\":0.9,"));
        CHECK(has(j, "\"splits\":8,"));
        CHECK(has(j, "\"observations\":80,"));
        CHECK(has(j, "\"cautions\":[\"" + e.cautions[0] + "\"]"));

        std::ostringstream csv;
        heldout::write_csv(csv, {e});
        const auto header = csv_row(csv.str(), 0), row = csv_row(csv.str());
        REQUIRE(header.size() == row.size());
        std::map<std::string, std::string> field;
        for (std::size_t i = 0; i < header.size(); ++i)
            field[header[i]] = row[i];
        CHECK(field["record"] == "estimate");
        CHECK(field["model"] == "mean");
        CHECK(field["method"] == "naive_t");
        CHECK(field["level"] == "0.9");
        CHECK(field["splits"] == "8");
        CHECK(field["observations"] == "80");
        CHECK(field["cautions"] == e.cautions[0]);
    }
    TEST_CASE("the default over splits carries no caution, and says so nowhere") {
        const auto e = fitted(0.0, "mean").estimate(heldout::measure::mse{});
        CHECK(e.method == heldout::ci::method_id::corrected_t);
        CHECK(e.cautions.empty());
        std::ostringstream line;
        line << e;
        CHECK_FALSE(has(line.str(), "caution"));
        CHECK(has(heldout::to_json(e), "\"cautions\":[]"));
    }
    TEST_CASE("a comparison over splits: method, level, splits, rows, both names and caution everywhere") {
        const auto a = fitted(0.0, "mean"), b = fitted(0.5, "shifted");
        const auto c = heldout::compare(a, b, heldout::measure::mse{}, heldout::paired::naive_t, 0.9);
        REQUIRE(c.cautions.size() == 1);
        std::ostringstream line;
        line << c;
        const std::string t = line.str();
        CHECK(t.rfind("MSE mean - shifted = ", 0) == 0);
        CHECK(has(t, "] 90%, " + c.method_label));
        CHECK(has(t, "; 8 splits, n=80; caution: " + c.cautions[0]));

        const std::string j = heldout::to_json(c);
        CHECK(has(j, "\"model_a\":\"mean\",\"model_b\":\"shifted\""));
        CHECK(has(j, "\"method\":\"naive_t\""));
        CHECK(has(j, "\"level\":0.9,"));
        CHECK(has(j, "\"splits\":8,"));
        CHECK(has(j, "\"observations\":80,"));
        CHECK(has(j, "\"cautions\":[\"" + c.cautions[0] + "\"]"));

        std::ostringstream csv;
        heldout::write_csv(csv, std::vector<heldout::comparison>{c});
        const auto header = csv_row(csv.str(), 0), row = csv_row(csv.str());
        REQUIRE(header.size() == row.size());
        std::map<std::string, std::string> field;
        for (std::size_t i = 0; i < header.size(); ++i)
            field[header[i]] = row[i];
        CHECK(field["model_a"] == "mean");
        CHECK(field["model_b"] == "shifted");
        CHECK(field["method"] == "naive_t");
        CHECK(field["level"] == "0.9");
        CHECK(field["splits"] == "8");
        CHECK(field["observations"] == "80");
        CHECK(field["cautions"] == c.cautions[0]);
    }
    TEST_CASE("a paired DeLong test with 4 positives names the class counts in line, JSON and CSV") {
        // 4 positives, 16 negatives; two scores that disagree on some pairs.
        std::vector<int> y(20, 0);
        std::vector<double> sa(20), sb(20);
        for (std::size_t i = 0; i < 20; ++i) {
            y[i] = i < 4 ? 1 : 0;
            sa[i] = static_cast<double>((i * 7) % 20) + (i < 4 ? 6.0 : 0.0);
            sb[i] = static_cast<double>((i * 11) % 20) + (i < 4 ? 5.0 : 0.0);
        }
        const auto c = heldout::compare(heldout::measure::auc{}, y, sa, sb, heldout::paired::delong);
        REQUIRE(c.cautions.size() == 1);
        CHECK(c.cautions[0].rfind("only 4 positives (4 positive, 16 negative)", 0) == 0);
        std::ostringstream line;
        line << c;
        CHECK(has(line.str(), "; 1 split, n=20; caution: only 4 positives (4 positive, 16 negative)"));
        CHECK(has(heldout::to_json(c), "\"cautions\":[\"only 4 positives (4 positive, 16 negative)"));
        CHECK(has(heldout::to_json(c), "\"method\":\"delong\""));
        std::ostringstream csv;
        heldout::write_csv(csv, std::vector<heldout::comparison>{c});
        const auto header = csv_row(csv.str(), 0), row = csv_row(csv.str());
        REQUIRE(header.size() == row.size());
        CHECK(header.back() == "cautions");
        CHECK(row.back().rfind("only 4 positives (4 positive, 16 negative)", 0) == 0);
        CHECK(row[3] == "delong");
        CHECK(row[4] == "0.95");
    }
}
