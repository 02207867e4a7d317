// Tests of model names flowing from the aggregator (aggregator::set_model) into estimates,
// comparisons, their text, JSON and CSV, and of the several-model predictions CSV
// (estimate/predictions_csv.hpp) in the wide layout the heldout tool reads.
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/predictions_csv.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/plan/kfold.hpp>

#include <doctest/doctest.h>

#include <Eigen/Core>

#include <cstdint>
#include <sstream>
#include <string>
#include <vector>

namespace {

/// Two regression models on 5-fold CV of 40 rows: predictions truth + small offsets.
std::vector<heldout::aggregator> two_models(bool named) {
    std::vector<double> y(40);
    for (std::size_t i = 0; i < y.size(); ++i)
        y[i] = static_cast<double>(i % 7) * 0.5;
    std::vector<heldout::aggregator> models(2, heldout::aggregator(heldout::measure::mse{}));
    if (named) {
        models[0].set_model("ridge");
        models[1].set_model("tree, deep");
    }
    for (const heldout::split& s : heldout::kfold{.folds = 5, .seed = 3}.splits(y.size())) {
        std::vector<double> t, a, b;
        for (const std::size_t r : s.test) {
            t.push_back(y[r]);
            a.push_back(y[r] + 0.25 * static_cast<double>(r % 3));
            b.push_back(y[r] - 0.5 * static_cast<double>(r % 2));
        }
        models[0].record(s, t, a);
        models[1].record(s, t, b);
    }
    return models;
}

} // namespace

TEST_SUITE("estimate/model_names") {
    TEST_CASE("a named aggregator names its estimates: field, text, JSON, CSV") {
        const auto models = two_models(true);
        CHECK(models[0].model() == "ridge");
        const auto copy = models[0]; // the name survives a copy
        CHECK(copy.model() == "ridge");
        const heldout::estimate e = models[0].estimate(heldout::measure::mse{});
        CHECK(e.model == "ridge");
        std::ostringstream text;
        text << e;
        CHECK(text.str().rfind("ridge: MSE ", 0) == 0);
        CHECK(heldout::to_json(e).rfind("{\"model\":\"ridge\",\"measure\":\"MSE\",", 0) == 0);
        std::ostringstream csv;
        heldout::write_csv(csv, {models[1].estimate(heldout::measure::mse{})});
        const std::string c = csv.str();
        CHECK(c.find("\nestimate,\"tree, deep\",MSE,corrected_t,") != std::string::npos);
        CHECK(c.find("\nsplit,\"tree, deep\",MSE,corrected_t,") != std::string::npos);
        // unnamed: no model key in JSON, an empty field in CSV, the text as before
        const auto unnamed = two_models(false);
        const heldout::estimate u = unnamed[0].estimate(heldout::measure::mse{});
        CHECK(u.model.empty());
        CHECK(heldout::to_json(u).rfind("{\"measure\":\"MSE\",", 0) == 0);
        std::ostringstream ut;
        ut << u;
        CHECK(ut.str().rfind("MSE ", 0) == 0);
    }

    TEST_CASE("compare and compare_all_pairs take the names from the aggregators") {
        const auto models = two_models(true);
        const auto c = heldout::compare(models[0], models[1], heldout::measure::mse{});
        CHECK(c.model_a == "ridge");
        CHECK(c.model_b == "tree, deep");
        std::ostringstream text;
        text << c;
        CHECK(text.str().rfind("MSE ridge - tree, deep = ", 0) == 0);
        const auto all =
            heldout::compare_all_pairs(std::span<const heldout::aggregator>(models), heldout::measure::mse{});
        REQUIRE(all.size() == 1);
        CHECK(all[0].model_a == "ridge");
        CHECK(all[0].model_b == "tree, deep");
        // names given by hand still win; unnamed aggregators still get "A"/"B" and "model j"
        const auto given =
            heldout::compare_all_pairs(std::span<const heldout::aggregator>(models), heldout::measure::mse{},
                                       heldout::paired::automatic, 0.95, {"x", "y"});
        CHECK(given[0].model_a == "x");
        const auto unnamed = two_models(false);
        const auto cu = heldout::compare(unnamed[0], unnamed[1], heldout::measure::mse{});
        CHECK(cu.model_a == "A");
        CHECK(cu.model_b == "B");
        const auto au =
            heldout::compare_all_pairs(std::span<const heldout::aggregator>(unnamed), heldout::measure::mse{});
        CHECK(au[0].model_a == "model 1");
        CHECK(au[0].model_b == "model 2");
    }

    TEST_CASE("several models' predictions in one wide CSV") {
        const auto models = two_models(true);
        std::ostringstream os;
        heldout::write_predictions_csv(os, models);
        const std::string s = os.str();
        std::istringstream in(s);
        std::string line;
        std::getline(in, line);
        CHECK(line == "split,repeat,fold,row,truth,ridge,\"tree, deep\"");
        std::size_t rows = 0;
        while (std::getline(in, line))
            ++rows;
        CHECK(rows == 40);
        // the first data row: split 0's first test row, its truth and both predictions, as
        // the single-model writer prints them
        std::ostringstream one;
        models[0].write_predictions_csv(one);
        std::istringstream one_in(one.str());
        std::getline(one_in, line);
        CHECK(line == "split,repeat,fold,row,truth,ridge");
        std::string first_one, first_wide;
        std::getline(one_in, first_one);
        std::istringstream again(s);
        std::getline(again, line);
        std::getline(again, first_wide);
        CHECK(first_wide.rfind(first_one + ",", 0) == 0);

        // models that recorded other splits are refused, naming the model
        std::vector<heldout::aggregator> mixed{models[0], heldout::aggregator(heldout::measure::mse{})};
        mixed[1].set_model("late");
        std::vector<double> t{1, 2}, f{1, 2};
        const std::vector<std::size_t> train{2, 3}, test{0, 1};
        mixed[1].record(heldout::split{train, test}, t, f);
        CHECK_THROWS_WITH_AS(heldout::write_predictions_csv(os, mixed),
                             "heldout::write_predictions_csv: argument 'models[1]': 1 splits recorded, model 0 has 5",
                             heldout::input_error);
        std::vector<heldout::aggregator> same_name{models[0], models[0]};
        CHECK_THROWS_WITH_AS(heldout::write_predictions_csv(os, same_name),
                             "heldout::write_predictions_csv: argument 'models[1]': model name 'ridge' repeats "
                             "models[0]",
                             heldout::input_error);
    }

    TEST_CASE("class-probability rows get one column per class: NAME:0 .. NAME:k-1") {
        const std::vector<std::int64_t> y{0, 1, 2, 1};
        Eigen::MatrixXd p(4, 3);
        p << 0.7, 0.2, 0.1, 0.1, 0.8, 0.1, 0.2, 0.2, 0.6, 0.3, 0.4, 0.3;
        const std::vector<std::size_t> train{}, test{0, 1, 2, 3};
        heldout::aggregator a(heldout::measure::multiclass_brier_score{});
        a.set_model("softmax");
        a.record(heldout::split{train, test}, y, p);
        std::ostringstream os;
        heldout::write_predictions_csv(os, std::vector<heldout::aggregator>{a});
        std::istringstream in(os.str());
        std::string line;
        std::getline(in, line);
        CHECK(line == "split,repeat,fold,row,truth,softmax:0,softmax:1,softmax:2");
        std::getline(in, line);
        CHECK(line == "0,0,0,0,0,0.7,0.2,0.1");
    }
}
