// Tests for heldout/measure/r_squared.hpp: 1 - SSE/SST with the test set's own mean.
#include <heldout/measure/r_squared.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::r_squared;

TEST_SUITE("measure/r_squared") {
    TEST_CASE_TEMPLATE("worked example: SSE = 2.0, SST = 12.7, R^2 = 1 - 2/12.7", T, float, double) {
        // methods.md Appendix A, Check [SELF]: ybar = 3.4; SST = 3.61 + 1.96 + 0.01 + 0.36 + 6.76
        // = 12.7; SSE = 4 * 0.25 + 1 = 2.0; R^2 = 0.842519685039.
        const std::vector<T> y{T(1.5), T(2.0), T(3.5), T(4.0), T(6.0)};
        const std::vector<T> f{T(1.0), T(2.5), T(3.0), T(4.5), T(5.0)};
        CHECK(evaluate(r_squared{}, y, f) == doctest::Approx(0.842519685039).epsilon(1e-12));
        // weights 0, 1, 1, 1, 0 (rows 2.0, 3.5, 4.0): mean 19/6; SST = (2 - 19/6)^2 +
        // (3.5 - 19/6)^2 + (4 - 19/6)^2 = 49/36 + 4/36 + 25/36 = 78/36; SSE = 3 * 0.25 = 0.75.
        const std::vector<T> w{0, 1, 1, 1, 0};
        CHECK(evaluate(r_squared{}, y, f, w) == doctest::Approx(1 - 0.75 / (78.0 / 36)).epsilon(1e-12));
    }
    TEST_CASE("higher is better, and R^2 can be negative") {
        CHECK(r_squared::better == heldout::direction::higher_is_better);
        const std::vector<double> y{1, 2, 3}, f{3, 2, 1}; // SSE = 8, SST = 2: 1 - 4 = -3
        CHECK(evaluate(r_squared{}, y, f) == doctest::Approx(-3.0).epsilon(1e-15));
    }
    TEST_CASE("live reference: 1 - SSE/SST with numpy.average / numpy.var") {
        heldout_test::reference_table ref("ref_r_squared");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth"), f = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(r_squared{}, y, f), ref.scalar(k + "r2")));
            CHECK(heldout_test::close(evaluate(r_squared{}, y, f), ref.scalar(k + "r2_var"))); // numpy.var route
            CHECK(heldout_test::close(evaluate(r_squared{}, y, f, w), ref.scalar(k + "wr2")));
        }
    }
    TEST_CASE("merge of shards (Chan et al. 1979) and single rows (West 1979) equal the whole") {
        heldout_test::reference_table ref("ref_r_squared");
        const auto y = ref.get("case1.truth"), f = ref.get("case1.prediction"), w = ref.get("case1.weights");
        const std::size_t h = y.size() / 3;
        auto a = r_squared{}.accumulator(), b = a, c = a, e = a;
        a.add(std::span(y).first(h), std::span(f).first(h), std::span(w).first(h));
        b.add(std::span(y).subspan(h), std::span(f).subspan(h), std::span(w).subspan(h));
        a.merge(b);
        CHECK(heldout_test::close(a.value(), ref.scalar("case1.wr2"), 1e-12));
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], f[i], w[i]);
        CHECK(heldout_test::close(c.value(), ref.scalar("case1.wr2"), 1e-12));
        e.merge(a); // merging into an empty accumulator
        CHECK(e.value() == a.value());
        const Eigen::Map<const Eigen::VectorXd> ye(y.data(), static_cast<Eigen::Index>(y.size()));
        CHECK(heldout_test::close(evaluate(r_squared{}, ye, f), ref.scalar("case1.r2")));
    }
    TEST_CASE("constant truth is undefined, detected exactly even where SST would round to a tiny number") {
        const std::vector<double> y{0.1, 0.1, 0.1}, f{0.1, 0.2, 0.3};
        CHECK_THROWS_WITH_AS(evaluate(r_squared{}, y, f),
                             "measure R-squared: undefined: truth is constant (total sum of squares is zero)",
                             heldout::undefined_error);
        const std::vector<double> y2{0.1, 5.0, 0.1}, w{0.3, 0, 0.7}; // constant among positive weights
        CHECK_THROWS_AS(evaluate(r_squared{}, y2, f, w), heldout::undefined_error);
        CHECK_THROWS_WITH_AS((void)r_squared{}.accumulator().value(), "measure R-squared: undefined: no observations",
                             heldout::undefined_error);
        const std::vector<double> w0{0, 0, 0};
        CHECK_THROWS_WITH_AS(evaluate(r_squared{}, y2, f, w0), "measure R-squared: undefined: total weight is zero",
                             heldout::undefined_error);
    }
    TEST_CASE("bad input names the argument and the index") {
        const std::vector<double> y{1, 2, 3}, f{1, 2, INFINITY};
        CHECK_THROWS_WITH_AS(evaluate(r_squared{}, y, f),
                             "measure R-squared: argument 'prediction': not finite (inf) at index 2",
                             heldout::input_error);
    }
}
