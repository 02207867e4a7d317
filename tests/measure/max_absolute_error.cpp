// Tests for heldout/measure/max_absolute_error.hpp: max |y - f| over rows of positive weight.
#include <heldout/measure/max_absolute_error.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::max_absolute_error;

TEST_SUITE("measure/max_absolute_error") {
    TEST_CASE_TEMPLATE("worked example: errors 0.5, 0.5, 0.5, 0.5, 1.0 give 1.0", T, float, double) {
        const std::vector<T> y{T(1.5), T(2.0), T(3.5), T(4.0), T(6.0)};
        const std::vector<T> f{T(1.0), T(2.5), T(3.0), T(4.5), T(5.0)};
        CHECK(evaluate(max_absolute_error{}, y, f) == 1.0);
        const std::vector<T> w{1, 3, 1, 1, 0}; // the row with error 1 has weight 0: max is 0.5
        CHECK(evaluate(max_absolute_error{}, y, f, w) == 0.5);
    }
    TEST_CASE("live reference: numpy.max(|y - f|), all rows and rows with w > 0") {
        heldout_test::reference_table ref("ref_max_absolute_error");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth"), f = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(evaluate(max_absolute_error{}, y, f) == ref.scalar(k + "max"));
            CHECK(evaluate(max_absolute_error{}, y, f, w) == ref.scalar(k + "wmax"));
        }
    }
    TEST_CASE("merge, single rows and Eigen inputs agree") {
        heldout_test::reference_table ref("ref_max_absolute_error");
        const auto y = ref.get("case3.truth"), f = ref.get("case3.prediction");
        const std::size_t h = y.size() / 2;
        auto a = max_absolute_error{}.accumulator(), b = a, c = a;
        a.add(std::span(y).first(h), std::span(f).first(h));
        b.add(std::span(y).subspan(h), std::span(f).subspan(h));
        a.merge(b);
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], f[i]);
        CHECK(a.value() == ref.scalar("case3.max"));
        CHECK(c.value() == ref.scalar("case3.max"));
        const Eigen::Map<const Eigen::VectorXd> ye(y.data(), static_cast<Eigen::Index>(y.size()));
        CHECK(evaluate(max_absolute_error{}, ye, f) == ref.scalar("case3.max"));
    }
    TEST_CASE("bad input and the undefined cases") {
        const std::vector<double> y{1, NAN}, f{1, 2};
        CHECK_THROWS_WITH_AS(evaluate(max_absolute_error{}, y, f),
                             "measure max absolute error: argument 'truth': not finite (nan) at index 1",
                             heldout::input_error);
        const std::vector<double> ok{1, 2}, w{0, 0}, neg{1, -2};
        CHECK_THROWS_WITH_AS(evaluate(max_absolute_error{}, ok, f, w),
                             "measure max absolute error: undefined: total weight is zero", heldout::undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(max_absolute_error{}, ok, f, neg),
                             "measure max absolute error: argument 'weights': negative weight -2 at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS((void)max_absolute_error{}.accumulator().value(), heldout::undefined_error);
    }
}
