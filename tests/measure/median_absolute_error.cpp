// Tests for heldout/measure/median_absolute_error.hpp: the weighted median of |y - f|.
#include <heldout/measure/median_absolute_error.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::median_absolute_error;

TEST_SUITE("measure/median_absolute_error") {
    TEST_CASE_TEMPLATE("worked examples: odd n, even n, weights", T, float, double) {
        // errors 0.5, 0.5, 0.5, 0.5, 1.0 (n = 5): the middle value 0.5
        const std::vector<T> y{T(1.5), T(2.0), T(3.5), T(4.0), T(6.0)};
        const std::vector<T> f{T(1.0), T(2.5), T(3.0), T(4.5), T(5.0)};
        CHECK(evaluate(median_absolute_error{}, y, f) == 0.5);
        // errors 1, 2, 3, 4 (n = 4): the mean of the two middle values, (2 + 3) / 2
        const std::vector<T> z{0, 0, 0, 0}, g{1, -2, 3, -4};
        CHECK(evaluate(median_absolute_error{}, z, g) == 2.5);
        // weights 1, 1, 1, 5 (W = 8, W/2 = 4): C = 1, 2, 3, 8; lower = smallest e with C >= 4 = 4,
        // upper = smallest e with C > 4 = 4: the median is 4 (as 1, 2, 3, 4, 4, 4, 4, 4).
        const std::vector<T> w{1, 1, 1, 5};
        CHECK(evaluate(median_absolute_error{}, z, g, w) == 4.0);
        // weights 2, 0, 1, 1 (W = 4): C = 2, 2, 3, 4; lower 1 (C = 2 >= 2), upper 3 (C = 3 > 2):
        // (1 + 3) / 2 = 2, as the replicated set 1, 1, 3, 4; the weight-0 error 2 never decides.
        const std::vector<T> w2{2, 0, 1, 1};
        CHECK(evaluate(median_absolute_error{}, z, g, w2) == 2.0);
    }
    TEST_CASE("live reference: numpy.median; integer weights as numpy.repeat; fractional by sorting") {
        heldout_test::reference_table ref("ref_median_absolute_error");
        for (int c = 0; c < 6; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth"), f = ref.get(k + "prediction");
            CHECK(heldout_test::close(evaluate(median_absolute_error{}, y, f), ref.scalar(k + "median")));
            CHECK(heldout_test::close(evaluate(median_absolute_error{}, y, f, ref.get(k + "int_weights")),
                                      ref.scalar(k + "int_weighted")));
            CHECK(heldout_test::close(evaluate(median_absolute_error{}, y, f, ref.get(k + "frac_weights")),
                                      ref.scalar(k + "frac_weighted")));
        }
    }
    TEST_CASE("merge of two halves equals the whole; reset keeps working; Eigen inputs") {
        heldout_test::reference_table ref("ref_median_absolute_error");
        const auto y = ref.get("case2.truth"), f = ref.get("case2.prediction");
        const std::size_t h = y.size() / 2;
        auto a = median_absolute_error{}.accumulator(), b = a;
        a.add(std::span(y).first(h), std::span(f).first(h));
        b.add(std::span(y).subspan(h), std::span(f).subspan(h));
        a.merge(b);
        CHECK(a.value() == evaluate(median_absolute_error{}, y, f));
        a.reset();
        CHECK_THROWS_AS((void)a.value(), heldout::undefined_error);
        a.add_one(0.0, 3.0);
        CHECK(a.value() == 3.0);
        const Eigen::Map<const Eigen::VectorXd> ye(y.data(), static_cast<Eigen::Index>(y.size()));
        CHECK(evaluate(median_absolute_error{}, ye, f) == evaluate(median_absolute_error{}, y, f));
    }
    TEST_CASE("bad input and the undefined cases") {
        const std::vector<double> y{1, 2}, f{NAN, 2};
        CHECK_THROWS_WITH_AS(evaluate(median_absolute_error{}, y, f),
                             "measure median absolute error: argument 'prediction': not finite (nan) at index 0",
                             heldout::input_error);
        const std::vector<double> ok{1, 2}, w{0, 0};
        CHECK_THROWS_WITH_AS(evaluate(median_absolute_error{}, y, ok, w),
                             "measure median absolute error: undefined: total weight is zero",
                             heldout::undefined_error);
        const std::vector<double> empty;
        CHECK_THROWS_WITH_AS(evaluate(median_absolute_error{}, empty, empty),
                             "measure median absolute error: argument 'truth': empty input", heldout::input_error);
    }
}
