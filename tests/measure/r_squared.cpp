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
        // worked by hand from the definitions: ybar = 3.4; SST = 3.61 + 1.96 + 0.01 + 0.36 + 6.76
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
    TEST_CASE("merge of shards (Chan et al. 1979) and single rows equal the whole") {
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
    TEST_CASE("shards of unequal size merge to the whole at a common offset of 1e12") {
        // R^2 does not change when truth and prediction move by one constant (SSE and SST are
        // differences), so the rows without the offset give the oracle; the offset rows are
        // 1e12 + x exactly representable (x on a 2^-10 grid), so both sets hold the same data.
        // Before the two-part mean, the merged value differed from the whole by ~1e-6.
        std::mt19937_64 g(77);
        std::normal_distribution<double> noise(0, 1);
        const double offset = 1e12;
        std::vector<double> y, f, y0, f0, w;
        for (int i = 0; i < 3000; ++i) {
            const double shard_shift = i < 17 ? 3 : (i < 1200 ? -0.5 : 0.25); // shard means differ
            const double x = std::round((noise(g) + shard_shift) * 1024) / 1024;
            const double e = std::round(0.3 * noise(g) * 1024) / 1024;
            y0.push_back(x);
            f0.push_back(x + e);
            y.push_back(offset + x);
            f.push_back(offset + x + e);
            w.push_back(std::round(1 + 3 * std::abs(noise(g))));
        }
        for (const bool weighted : {false, true}) {
            CAPTURE(weighted);
            const double oracle = weighted ? evaluate(r_squared{}, y0, f0, w) : evaluate(r_squared{}, y0, f0);
            const double whole = weighted ? evaluate(r_squared{}, y, f, w) : evaluate(r_squared{}, y, f);
            CHECK(heldout_test::close(whole, oracle, 1e-12));
            auto merged = r_squared{}.accumulator(), streamed = merged;
            const std::size_t cuts[] = {0, 17, 1200, 1201, 3000}; // shards of 17, 1183, 1 and 1799 rows
            for (std::size_t k = 0; k + 1 < std::size(cuts); ++k) {
                auto shard = r_squared{}.accumulator();
                const auto n = cuts[k + 1] - cuts[k];
                if (weighted)
                    shard.add(std::span(y).subspan(cuts[k], n), std::span(f).subspan(cuts[k], n),
                              std::span(w).subspan(cuts[k], n));
                else
                    shard.add(std::span(y).subspan(cuts[k], n), std::span(f).subspan(cuts[k], n));
                merged.merge(shard);
            }
            CHECK(heldout_test::close(merged.value(), whole, 1e-12));
            for (std::size_t i = 0; i < y.size(); ++i)
                streamed.add_one(y[i], f[i], weighted ? w[i] : 1.0);
            CHECK(heldout_test::close(streamed.value(), whole, 1e-12));
        }
    }
    TEST_CASE("the scale of the weights does not matter, nor where the batches are cut") {
        // Weights 1e-300 .. 1e300 in one accumulator: each batch is kept in units of its own
        // largest weight, aligned when merged (see also measure/weight_scale).
        const std::vector<double> y{1, 2, 4, 7, 11, 16}, f{1.5, 2, 3, 8, 10, 15};
        const std::vector<double> w{1, 2, 1, 3, 1, 2};
        const double whole = evaluate(r_squared{}, y, f, w);
        auto a = r_squared{}.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i) {
            auto one = r_squared{}.accumulator();
            one.add_one(y[i], f[i], w[i] * 1e300);
            auto other = r_squared{}.accumulator();
            other.add_one(y[i], f[i], w[i] * 1e300); // twice the weight: the same as w[i] doubled
            one.merge(other);
            a.merge(one);
        }
        CHECK(heldout_test::close(a.value(), whole, 1e-14));
        auto tiny = r_squared{}.accumulator();
        tiny.add(std::span(y).first(2), std::span(f).first(2), std::vector<double>{1e-300, 2e-300});
        tiny.add(std::span(y).subspan(2), std::span(f).subspan(2), std::vector<double>{1e-300, 3e-300, 1e-300, 2e-300});
        CHECK(heldout_test::close(tiny.value(), whole, 1e-14));
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
