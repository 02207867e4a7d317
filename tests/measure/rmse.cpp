// Tests for heldout/measure/rmse.hpp: root mean squared error.
#include <heldout/measure/rmse.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::rmse;

TEST_SUITE("measure/rmse") {
    TEST_CASE_TEMPLATE("worked example: sqrt(0.4) = 0.632455532034", T, float, double) {
        // worked by hand from the definitions: MSE = (4 * 0.25 + 1) / 5 = 0.4, RMSE = 0.632455532034.
        const std::vector<T> y{T(1.5), T(2.0), T(3.5), T(4.0), T(6.0)};
        const std::vector<T> f{T(1.0), T(2.5), T(3.0), T(4.5), T(5.0)};
        CHECK(evaluate(rmse{}, y, f) == doctest::Approx(0.632455532034).epsilon(1e-12));
        const std::vector<T> w{1, 0, 0, 0, 1}; // (0.25 + 1) / 2 = 0.625
        CHECK(evaluate(rmse{}, y, f, w) == doctest::Approx(std::sqrt(0.625)).epsilon(1e-15));
    }
    TEST_CASE("a measure of its own, lower is better") {
        static_assert(heldout::outer_measure<rmse>);
        CHECK(rmse{}.name() == "RMSE");
        CHECK(rmse::better == heldout::direction::lower_is_better);
    }
    TEST_CASE("live reference: numpy.sqrt(numpy.average((y - f)**2)) with fractional weights") {
        heldout_test::reference_table ref("ref_rmse");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth"), f = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(rmse{}, y, f), ref.scalar(k + "rmse")));
            CHECK(heldout_test::close(evaluate(rmse{}, y, f, w), ref.scalar(k + "wrmse")));
        }
    }
    TEST_CASE("merge of two halves equals the whole (the root is taken last); Eigen float vectors") {
        heldout_test::reference_table ref("ref_rmse");
        const auto y = ref.get("case2.truth"), f = ref.get("case2.prediction");
        const std::size_t h = y.size() / 3;
        auto a = rmse{}.accumulator(), b = rmse{}.accumulator();
        a.add(std::span(y).first(h), std::span(f).first(h));
        b.add(std::span(y).subspan(h), std::span(f).subspan(h));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(evaluate(rmse{}, y, f)).epsilon(1e-15));
        Eigen::VectorXf ye(2), fe(2);
        ye << 1.0f, 2.0f;
        fe << 4.0f, 6.0f; // errors 3, 4: sqrt(12.5)
        CHECK(evaluate(rmse{}, ye, fe) == doctest::Approx(std::sqrt(12.5)));
    }
    TEST_CASE("bad input and the undefined cases") {
        const std::vector<double> y{1, 2}, f{1};
        CHECK_THROWS_WITH_AS(evaluate(rmse{}, y, f),
                             "measure MSE: argument 'prediction': size 1 differs from size 2 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_AS((void)rmse{}.accumulator().value(), heldout::undefined_error);
    }
}
