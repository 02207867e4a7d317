// Tests for heldout/estimate/evaluate_splits.hpp: the loop equals a hand-written one,
// results do not depend on the thread count, errors propagate, bootstrap plans get their
// apparent fit.
#include <heldout/estimate/evaluate_splits.hpp>

#include <heldout/loss/absolute.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>

#include "support/line_data.hpp"
#include <doctest/doctest.h>

#include <atomic>
#include <random>
#include <span>
#include <sstream>
#include <stdexcept>
#include <vector>

using heldout::aggregator;
namespace measure = heldout::measure;
using mae = heldout::measure::mean_loss<heldout::loss::absolute>;

namespace {

using heldout_test::line_fit;
using data = heldout_test::line_data;

std::string export_of(const aggregator& agg) {
    std::ostringstream os;
    heldout::write_json(
        os, {agg.estimate(measure::mse{}), agg.estimate(measure::mse{}, heldout::ci::naive_t), agg.estimate(mae{})});
    agg.write_predictions_csv(os);
    return os.str();
}

} // namespace

TEST_SUITE("estimate/evaluate_splits") {
    TEST_CASE("equals the hand-written loop over the same plan") {
        const data D = heldout_test::make_line_data(97, 1);
        const line_fit fit{&D};
        const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 3, .seed = 9};
        const aggregator agg = heldout::evaluate_splits(plan.splits(D.y.size()), D.y, fit, measure::mse{}, mae{});
        aggregator hand(measure::mse{}, mae{});
        for (const heldout::split& s : plan.splits(D.y.size())) {
            std::vector<double> t;
            for (auto r : s.test)
                t.push_back(D.y[r]);
            hand.record(s, t, fit(s.train, s.test));
        }
        CHECK(agg.size() == 15);
        CHECK(export_of(agg) == export_of(hand));
        const auto e = agg.estimate(measure::mse{});
        CHECK(e.method == heldout::ci::method_id::corrected_t);
        CHECK(agg.shape().repeats == 3);
        CHECK(agg.splits()[7].repeat == 1);
        CHECK(agg.splits()[7].fold == 2);
    }

    TEST_CASE("identical results for 1, 2 and 3 threads (recorded in split order)") {
        const data D = heldout_test::make_line_data(151, 2);
        std::atomic<int> calls{0};
        auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            ++calls;
            return line_fit{&D}(train, test);
        };
        const auto plan = heldout::repeated_kfold{.folds = 4, .repeats = 5, .seed = 3};
        const std::string one = export_of(heldout::evaluate_splits(
            plan.splits(D.y.size()), D.y, fit, heldout::evaluate_options{.threads = 1}, measure::mse{}, mae{}));
        for (unsigned threads : {2u, 3u}) {
            const auto agg =
                heldout::evaluate_splits(plan.splits(D.y.size()), D.y, fit,
                                         heldout::evaluate_options{.threads = threads}, measure::mse{}, mae{});
            CHECK(export_of(agg) == one);
        }
        CHECK(calls == 60);
    }

    TEST_CASE("an exception from fit_predict reaches the caller, the earliest split's first") {
        const data D = heldout_test::make_line_data(40, 3);
        auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            if (test.front() % 2 == 0 && train.size() > 0)
                throw std::runtime_error("fit failed at a split whose first test row is " +
                                         std::to_string(test.front()));
            return line_fit{&D}(train, test);
        };
        const auto plan = heldout::kfold{.folds = 8, .seed = 5};
        std::string first;
        for (const heldout::split& s : plan.splits(40))
            if (first.empty() && s.test.front() % 2 == 0)
                first = "fit failed at a split whose first test row is " + std::to_string(s.test.front());
        REQUIRE(!first.empty());
        for (unsigned threads : {1u, 2u})
            CHECK_THROWS_WITH_AS(heldout::evaluate_splits(plan.splits(40), D.y, fit,
                                                          heldout::evaluate_options{.threads = threads},
                                                          measure::mse{}),
                                 first.c_str(), std::runtime_error);
    }

    TEST_CASE("rows outside truth and wrong prediction counts are input errors") {
        const data D = heldout_test::make_line_data(10, 4);
        std::vector<std::size_t> train{0, 1, 2}, test{3, 12};
        std::vector<heldout::split> splits{heldout::split{train, test, 0, 0, 0, {}}};
        CHECK_THROWS_WITH_AS(heldout::evaluate_splits(splits, D.y, line_fit{&D}, measure::mse{}),
                             "heldout::evaluate_splits: argument 'split.test': row 12 outside the 10 rows of truth "
                             "at index 1",
                             heldout::input_error);
        std::vector<std::size_t> ok{3, 4};
        splits[0].test = ok;
        auto short_fit = [](std::span<const std::size_t>, std::span<const std::size_t>) {
            return std::vector<double>{1};
        };
        CHECK_THROWS_WITH_AS(heldout::evaluate_splits(splits, D.y, short_fit, measure::mse{}),
                             "heldout::aggregator::record: argument 'predictions': size 1 differs from size 2 of "
                             "'split.test'",
                             heldout::input_error);
    }

    TEST_CASE("bootstrap plans: the apparent fit is recorded, .632+ is the default") {
        const data D = heldout_test::make_line_data(60, 5);
        std::vector<int> labels;
        for (double v : D.y)
            labels.push_back(v > 1.0 ? 1 : 0);
        // a rule that predicts 1 where x exceeds the training rows' mean x
        auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            double sx = 0;
            for (auto r : train)
                sx += D.x[r];
            const double cut = sx / static_cast<double>(train.size());
            std::vector<int> out;
            for (auto r : test)
                out.push_back(D.x[r] > cut ? 1 : 0);
            return out;
        };
        const auto plan = heldout::bootstrap{.replicates = 50, .seed = 8};
        const auto agg =
            heldout::evaluate_splits(plan.splits(labels.size()), labels, fit, heldout::evaluate_options{.threads = 2},
                                     measure::classification_error{});
        CHECK(agg.has_apparent());
        const auto e = agg.estimate(measure::classification_error{});
        CHECK(e.method == heldout::ci::method_id::bootstrap_632_plus);
        CHECK(e.value >= 0.0);
        CHECK(e.value <= 1.0);
        // the same from one thread
        const auto one =
            heldout::evaluate_splits(plan.splits(labels.size()), labels, fit, measure::classification_error{});
        CHECK(one.estimate(measure::classification_error{}).value == e.value);
        const auto no_apparent =
            heldout::evaluate_splits(plan.splits(labels.size()), labels, fit,
                                     heldout::evaluate_options{.apparent = false}, measure::classification_error{});
        CHECK(!no_apparent.has_apparent());
        CHECK_THROWS_AS((void)no_apparent.estimate(measure::classification_error{}), heldout::input_error);
    }

    TEST_CASE("bootstrap replicates without out-of-bag rows are skipped and noted") {
        // n = 2: a replicate draws both rows (no out-of-bag row) with probability 1/2.
        const std::vector<double> y{1.0, 3.0};
        auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            double s = 0;
            for (auto r : train)
                s += y[r];
            return std::vector<double>(test.size(), s / static_cast<double>(train.size()));
        };
        const auto agg =
            heldout::evaluate_splits(heldout::bootstrap{.replicates = 20, .seed = 1}.splits(2), y, fit, measure::mse{});
        CHECK(agg.skipped() > 0);
        CHECK(agg.size() + agg.skipped() == 20);
        const auto e = agg.estimate(measure::mse{}, heldout::ci::bootstrap_632);
        bool noted = false;
        for (const auto& n : e.notes)
            noted = noted || n.find("with no out-of-bag rows skipped") != std::string::npos;
        CHECK(noted);
    }
}
