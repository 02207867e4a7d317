// Tests for heldout/measure/mae.hpp: mean absolute error.
#include <heldout/measure/mae.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::mae;

TEST_SUITE("measure/mae") {
    TEST_CASE_TEMPLATE("worked example: (0.5 + 0.5 + 0.5 + 0.5 + 1) / 5 = 0.6", T, float, double) {
        // worked by hand from the definitions (self-written reference): MAE = 0.6.
        const std::vector<T> y{T(1.5), T(2.0), T(3.5), T(4.0), T(6.0)};
        const std::vector<T> f{T(1.0), T(2.5), T(3.0), T(4.5), T(5.0)};
        CHECK(evaluate(mae{}, y, f) == doctest::Approx(0.6).epsilon(1e-15));
        // weights 1, 0, 0, 0, 2: (0.5 + 2 * 1) / 3
        const std::vector<T> w{1, 0, 0, 0, 2};
        CHECK(evaluate(mae{}, y, f, w) == doctest::Approx(2.5 / 3).epsilon(1e-15));
    }
    TEST_CASE("it is mean_loss<loss::absolute>, named MAE") {
        CHECK(std::is_same_v<mae, heldout::measure::mean_loss<heldout::loss::absolute>>);
        CHECK(mae{}.name() == "MAE");
        CHECK(mae::better == heldout::direction::lower_is_better);
        CHECK(mae::kind == heldout::prediction_kind::real);
    }
    TEST_CASE("live reference: numpy.average(|y - f|) on random data with ties and weights") {
        heldout_test::reference_table ref("ref_mae");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth"), f = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(mae{}, y, f), ref.scalar(k + "mae")));     // numpy.mean
            CHECK(heldout_test::close(evaluate(mae{}, y, f, w), ref.scalar(k + "wmae"))); // numpy.average
        }
    }
    TEST_CASE("merge of two halves equals the whole; Eigen inputs") {
        heldout_test::reference_table ref("ref_mae");
        const auto y = ref.get("case1.truth"), f = ref.get("case1.prediction");
        const std::size_t h = y.size() / 2;
        auto a = mae{}.accumulator(), b = mae{}.accumulator();
        a.add(std::span(y).first(h), std::span(f).first(h));
        b.add(std::span(y).subspan(h), std::span(f).subspan(h));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(evaluate(mae{}, y, f)).epsilon(1e-15));
        const Eigen::Map<const Eigen::VectorXd> ye(y.data(), static_cast<Eigen::Index>(y.size()));
        const Eigen::Map<const Eigen::VectorXd> fe(f.data(), static_cast<Eigen::Index>(f.size()));
        CHECK(evaluate(mae{}, ye, fe) == evaluate(mae{}, y, f));
    }
    TEST_CASE("bad input and the undefined cases") {
        const std::vector<double> y{1, 2, 3}, f{1, INFINITY, 3};
        CHECK_THROWS_WITH_AS(evaluate(mae{}, y, f), "measure MAE: argument 'prediction': not finite (inf) at index 1",
                             heldout::input_error);
        const std::vector<double> w{0, 0, 0}, ok{1, 2, 3};
        CHECK_THROWS_WITH_AS(evaluate(mae{}, y, ok, w), "measure MAE: undefined: total weight is zero",
                             heldout::undefined_error);
        CHECK_THROWS_WITH_AS((void)mae{}.accumulator().value(), "measure MAE: undefined: no observations",
                             heldout::undefined_error);
    }
}
