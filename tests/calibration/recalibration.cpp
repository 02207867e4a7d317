// Tests for heldout/calibration/recalibration.hpp: calibration slope and intercept (Cox 1958),
// their Wald intervals, the ideal-value declaration and comparisons by distance from it.
#include <heldout/calibration/recalibration.hpp>
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/tuning.hpp>
#include <heldout/measure/distance_from_ideal.hpp>
#include <heldout/stream/early_stopping.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <numeric>
#include <random>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::calibration_intercept;
using heldout::measure::calibration_slope;

namespace {
// Owns its rows: a heldout::split only views them (a split over a vector local to this
// function read freed memory, which ASan found).
heldout::owned_split one_test_set(std::size_t n) {
    heldout::owned_split s;
    s.test.resize(n);
    std::iota(s.test.begin(), s.test.end(), std::size_t{0});
    return s;
}
double logit(double p) { return std::log(p / (1 - p)); }
} // namespace

TEST_SUITE("calibration/recalibration") {
    TEST_CASE("worked example, intercept: every p = 1/2, 3 of 4 events -> a = logit(3/4) = log 3") {
        const std::vector<int> y{1, 1, 1, 0};
        const std::vector<double> p(4, 0.5);
        // score: sum (y - expit(a + 0)) = 3 - 4 expit(a) = 0 -> expit(a) = 3/4; information
        // 4 (3/4)(1/4) = 3/4 -> se = sqrt(4/3).
        CHECK(evaluate(calibration_intercept{}, y, p) == doctest::Approx(std::log(3.0)).epsilon(1e-13));
        const auto f = calibration_intercept{}.fitted(y, p);
        CHECK(f.se == doctest::Approx(std::sqrt(4.0 / 3.0)).epsilon(1e-13));
    }
    TEST_CASE("worked example, slope: two groups fit exactly: b = (logit(ybar2) - logit(ybar1)) / (x2 - x1)") {
        // group 1: p = 0.2 (x1 = logit 0.2), 1 event of 4; group 2: p = 0.8 (x2 = -x1), 3 of 4.
        // Saturated: a + b x_g = logit(ybar_g) -> b = (logit .75 - logit .25) / (x2 - x1)
        //                                         = 2 log 3 / (2 log 4) = log 3 / log 4.
        const std::vector<int> y{1, 0, 0, 0, 1, 1, 1, 0};
        const std::vector<double> p{0.2, 0.2, 0.2, 0.2, 0.8, 0.8, 0.8, 0.8};
        CHECK(evaluate(calibration_slope{}, y, p) == doctest::Approx(std::log(3.0) / std::log(4.0)).epsilon(1e-12));
        const auto f = heldout::logistic_recalibration(y, p);
        CHECK(f.intercept == doctest::Approx(0.0).epsilon(1e-12));
        // var(b) = (1/(n1 v1) + 1/(n2 v2)) / (x2 - x1)^2 with v = ybar(1 - ybar) = 3/16 in each group:
        // (4/3 + 4/3) / (2 log 4)^2.
        CHECK(f.se_slope == doctest::Approx(std::sqrt(8.0 / 3.0) / (2 * std::log(4.0))).epsilon(1e-12));
    }
    TEST_CASE("live reference: R glm(y ~ qlogis(p), binomial) and glm(y ~ 1, offset = qlogis(p)), confint.default") {
        // Source: tests/reference/ref_calibration.R (base R glm, Debian r-base-core), run on the
        // seeded data of ref_calibration.py; R converged with epsilon 1e-15. summary.glm's
        // standard errors come from the information at the iterate before the last (glm.fit's
        // final weights), which sits ~1e-8 away; the script also inverts the information at
        // the final coefficients (se_final), which is what heldout reports, checked at 1e-10.
        heldout_test::reference_table ref("ref_calibration");
        for (const std::string c : {"big", "weighted", "small", "extreme"}) {
            CAPTURE(c);
            const auto p = ref.get(c + ".p");
            const auto y = ref.get_as<int>(c + ".y");
            const auto w = ref.get(c + ".w");
            const auto f = heldout::logistic_recalibration(y, p, w);
            const auto coef = ref.get("R." + c + ".slope.coef"), se = ref.get("R." + c + ".slope.se");
            const auto se_final = ref.get("R." + c + ".slope.se_final");
            CHECK(heldout_test::close(f.intercept, coef[0], 1e-11, 1e-13));
            CHECK(heldout_test::close(f.slope, coef[1], 1e-12));
            CHECK(heldout_test::close(f.se_intercept, se_final[0], 1e-10));
            CHECK(heldout_test::close(f.se_slope, se_final[1], 1e-10));
            CHECK(heldout_test::close(f.covariance, ref.scalar("R." + c + ".slope.cov_final"), 1e-9));
            CHECK(heldout_test::close(f.se_intercept, se[0], 1e-7)); // summary.glm
            CHECK(heldout_test::close(f.se_slope, se[1], 1e-7));
            CHECK(heldout_test::close(evaluate(calibration_slope{}, y, p, w), coef[1], 1e-12));
            const double a = evaluate(calibration_intercept{}, y, p, w);
            CHECK(heldout_test::close(a, ref.scalar("R." + c + ".intercept.coef"), 1e-11, 1e-13));
            auto acc = calibration_intercept{}.accumulator();
            acc.add(y, p, w);
            CHECK(heldout_test::close(acc.fitted().se, ref.scalar("R." + c + ".intercept.se_final"), 1e-10));
            CHECK(heldout_test::close(acc.fitted().se, ref.scalar("R." + c + ".intercept.se"), 1e-7)); // summary.glm
            if (c == "weighted")
                continue; // the aggregator below records unweighted rows

            // ci::automatic on one test set is the Wald interval from the inverse information;
            // R's confint.default uses summary.glm's se (see above), hence 1e-7.
            heldout::aggregator agg(calibration_slope{}, calibration_intercept{});
            agg.record(one_test_set(p.size()).view(), y, p);
            const auto e = agg.estimate(calibration_slope{});
            CHECK(e.method == heldout::ci::method_id::wald);
            CHECK(heldout_test::close(*e.se, se_final[1], 1e-10));
            const auto w95 = ref.get("R." + c + ".slope.wald95");
            CHECK(heldout_test::close(*e.lower, w95[0], 1e-7));
            CHECK(heldout_test::close(*e.upper, w95[1], 1e-7));
            const auto e90 = agg.estimate(calibration_slope{}, heldout::ci::wald, 0.90);
            const auto w90 = ref.get("R." + c + ".slope.wald90");
            CHECK(heldout_test::close(*e90.lower, w90[0], 1e-7));
            CHECK(heldout_test::close(*e90.upper, w90[1], 1e-7));
            const auto ei = agg.estimate(calibration_intercept{});
            const auto i95 = ref.get("R." + c + ".intercept.wald95");
            CHECK(heldout_test::close(*ei.se, ref.scalar("R." + c + ".intercept.se_final"), 1e-10));
            CHECK(heldout_test::close(*ei.lower, i95[0], 1e-7));
            CHECK(heldout_test::close(*ei.upper, i95[1], 1e-7));
        }
    }
    TEST_CASE("integer weights are frequencies: the same fit as repeated rows (value and se)") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0};
        const std::vector<double> p{0.7, 0.4, 0.3, 0.9, 0.6, 0.2, 0.55, 0.35};
        const std::vector<double> w{2, 1, 3, 1, 2, 1, 1, 2};
        std::vector<int> yy;
        std::vector<double> pp;
        for (std::size_t i = 0; i < y.size(); ++i)
            for (int k = 0; k < static_cast<int>(w[i]); ++k) {
                yy.push_back(y[i]);
                pp.push_back(p[i]);
            }
        const auto a = heldout::logistic_recalibration(y, p, w), b = heldout::logistic_recalibration(yy, pp);
        CHECK(heldout_test::close(a.slope, b.slope, 1e-11));
        CHECK(heldout_test::close(a.intercept, b.intercept, 1e-11));
        CHECK(heldout_test::close(a.se_slope, b.se_slope, 1e-11));
        CHECK(heldout_test::close(a.se_intercept, b.se_intercept, 1e-11));
        // weights of 0 drop rows
        std::vector<double> w0 = w;
        w0[0] = 0;
        std::vector<int> y1(y.begin() + 1, y.end());
        std::vector<double> p1(p.begin() + 1, p.end()), w1(w.begin() + 1, w.end());
        CHECK(heldout_test::close(evaluate(calibration_slope{}, y, p, w0), evaluate(calibration_slope{}, y1, p1, w1),
                                  1e-11));
    }
    TEST_CASE("the value does not depend on the scale of the weights (1e-300 ... 1e300)") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1};
        const std::vector<double> p{0.7, 0.4, 0.3, 0.9, 0.6, 0.2, 0.55, 0.35, 0.8};
        const std::vector<double> w{2, 1, 3, 1, 2, 1, 1, 2, 0.5};
        const double s0 = evaluate(calibration_slope{}, y, p, w), i0 = evaluate(calibration_intercept{}, y, p, w);
        for (const double c : {1e-300, 1e-150, 1e-20, 3.0, 1e20, 1e150, 1e300}) {
            CAPTURE(c);
            std::vector<double> wc = w;
            for (double& x : wc)
                x *= c;
            CHECK(heldout_test::close(evaluate(calibration_slope{}, y, p, wc), s0, 1e-11));
            CHECK(heldout_test::close(evaluate(calibration_intercept{}, y, p, wc), i0, 1e-11));
        }
    }
    TEST_CASE("merge = whole; add_one = add; reset") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.7, 0.4, 0.3, 0.9, 0.6, 0.2, 0.55, 0.35, 0.8, 0.1};
        auto a = calibration_slope{}.accumulator(), b = a, c = a;
        a.add(std::span<const int>(y).first(4), std::span<const double>(p).first(4));
        b.add(std::span<const int>(y).subspan(4), std::span<const double>(p).subspan(4));
        a.merge(b);
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], p[i]);
        CHECK(a.value() == doctest::Approx(evaluate(calibration_slope{}, y, p)).epsilon(1e-14));
        CHECK(c.value() == doctest::Approx(evaluate(calibration_slope{}, y, p)).epsilon(1e-14));
        c.reset();
        CHECK(c.count() == 0);
        CHECK_THROWS_AS((void)c.value(), heldout::undefined_error);
    }
    TEST_CASE("bad input: input_error naming argument and row") {
        const std::vector<int> y{1, 0, 1};
        CHECK_THROWS_WITH_AS(evaluate(calibration_slope{}, y, std::vector<double>{0.2, 0.0, 0.5}),
                             "measure calibration slope: argument 'prediction': probability 0 has no logit: logistic "
                             "recalibration needs probabilities strictly inside (0, 1) at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(calibration_intercept{}, y, std::vector<double>{0.2, 0.3, 1.0}),
                             "measure calibration intercept: argument 'prediction': probability 1 has no logit: "
                             "logistic recalibration needs probabilities strictly inside (0, 1) at index 2",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(calibration_slope{}, y, std::vector<double>{0.2, NAN, 0.5}),
                             "measure calibration slope: argument 'prediction': not finite (nan) at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(calibration_slope{}, std::vector<int>{1, 2, 0}, std::vector<double>{.2, .3, .5}),
                             "measure calibration slope: argument 'truth': label outside the classes 0..1 at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(calibration_slope{}, y, std::vector<double>{.2, .3}),
                             "measure calibration slope: argument 'prediction': size 2 differs from size 3 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(
            evaluate(calibration_slope{}, y, std::vector<double>{.2, .3, .5}, std::vector<double>{1, -1, 1}),
            "measure calibration slope: argument 'weights': negative weight -1 at index 1", heldout::input_error);
    }
    TEST_CASE("undefined: one class, separation, constant probability, zero weight") {
        const std::vector<double> p{0.2, 0.4, 0.6, 0.8};
        CHECK_THROWS_WITH_AS(
            evaluate(calibration_slope{}, std::vector<int>{1, 1, 1, 1}, p),
            "measure calibration slope: undefined: only one class in the truth (every row of positive weight "
            "is 1): the maximum-likelihood estimate is infinite",
            heldout::undefined_error);
        CHECK_THROWS_AS(evaluate(calibration_intercept{}, std::vector<int>{0, 0, 0, 0}, p), heldout::undefined_error);
        // complete and quasi-complete separation (Albert & Anderson 1984): the slope is infinite
        CHECK_THROWS_WITH_AS(
            evaluate(calibration_slope{}, std::vector<int>{0, 0, 1, 1}, p),
            "measure calibration slope: undefined: logit(p) separates the classes (every row of one class has "
            "a logit no lower than every row of the other): the maximum-likelihood slope is infinite",
            heldout::undefined_error);
        CHECK_THROWS_AS(evaluate(calibration_slope{}, std::vector<int>{1, 1, 0, 0}, p), heldout::undefined_error);
        CHECK_THROWS_AS(evaluate(calibration_slope{}, std::vector<int>{0, 1, 0, 1, 1},
                                 std::vector<double>{0.2, 0.4, 0.4, 0.6, 0.8}),
                        heldout::undefined_error);
        // ... while the intercept exists there (it needs only both classes)
        CHECK(std::isfinite(evaluate(calibration_intercept{}, std::vector<int>{0, 0, 1, 1}, p)));
        CHECK_THROWS_WITH_AS(
            evaluate(calibration_slope{}, std::vector<int>{0, 1, 0}, std::vector<double>(3, 0.3)),
            "measure calibration slope: undefined: every probability is the same: the slope is not identifiable",
            heldout::undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(calibration_slope{}, std::vector<int>{0, 1}, std::vector<double>{.3, .6},
                                      std::vector<double>{0, 0}),
                             "measure calibration slope: undefined: total weight is zero", heldout::undefined_error);
    }
    TEST_CASE("perfectly calibrated probabilities give slope near 1 and intercept near 0 (n = 20000)") {
        // y ~ Bernoulli(p) exactly: the estimates are consistent for (1, 0); 5 se is a loose bound.
        std::mt19937_64 g(2026);
        std::uniform_real_distribution<double> u;
        std::vector<double> p;
        std::vector<int> y;
        for (int i = 0; i < 20000; ++i) {
            const double x = 4.0 * (u(g) - 0.5);
            const double q = 1 / (1 + std::exp(-x));
            p.push_back(q);
            y.push_back(u(g) < q ? 1 : 0);
        }
        const auto f = heldout::logistic_recalibration(y, p);
        CHECK(std::abs(f.slope - 1) < 5 * f.se_slope);
        CHECK(std::abs(f.intercept) < 5 * f.se_intercept);
        // recalibrating with the fitted (a, b) gives slope 1 and intercept 0 (a fixed point)
        std::vector<double> q(p.size());
        for (std::size_t i = 0; i < p.size(); ++i)
            q[i] = 1 / (1 + std::exp(-(f.intercept + f.slope * logit(p[i]))));
        const auto g2 = heldout::logistic_recalibration(y, q);
        CHECK(g2.slope == doctest::Approx(1.0).epsilon(1e-9));
        CHECK(std::abs(g2.intercept) < 1e-9);
    }
    TEST_CASE("the ideal value is declared, and comparisons rank by distance from it") {
        using T = heldout::measure_traits<calibration_slope>;
        static_assert(T::has_ideal && heldout::ideal_value_v<calibration_slope> == 1.0);
        static_assert(heldout::ideal_value_v<calibration_intercept> == 0.0);
        static_assert(!heldout::has_ideal_v<heldout::measure::distance_from_ideal<calibration_slope>>);
        static_assert(T::better_value(0.95, 1.1) && T::better_value(1.05, 0.9) && !T::better_value(1.3, 0.8));
        static_assert(heldout::better(heldout::direction::toward_ideal, -0.1, 0.2, 0.0));
        CHECK(T::badness(0.8) == doctest::Approx(0.2));

        // Model A: slope about 0.64 (too extreme); model B: the same probabilities shrunk to
        // slope about 1 in logit space. B is closer to the ideal, so A - B > 0 favours B.
        heldout_test::reference_table ref("ref_calibration");
        const auto pa = ref.get("big.p");
        const auto y = ref.get_as<int>("big.y");
        const auto fa = heldout::logistic_recalibration(y, pa);
        std::vector<double> pb(pa.size());
        for (std::size_t i = 0; i < pa.size(); ++i)
            pb[i] = 1 / (1 + std::exp(-(fa.intercept + fa.slope * logit(pa[i]))));
        const auto c = heldout::compare(calibration_slope{}, y, pa, pb, heldout::paired::bootstrap_percentile(500, 3));
        CHECK(c.measure == "distance of calibration slope from 1");
        CHECK(c.difference == doctest::Approx(std::abs(fa.slope - 1) - std::abs(1.0 - 1)).epsilon(1e-8));
        CHECK(c.difference > 0);
        CHECK(c.notes.at(0).find("ideal value 1") != std::string::npos);

        // without kept predictions the distance cannot be formed
        heldout::aggregator a(calibration_slope{}), b(calibration_slope{});
        a.keep_predictions(false);
        b.keep_predictions(false);
        a.record(one_test_set(pa.size()).view(), y, pa);
        b.record(one_test_set(pa.size()).view(), y, pb);
        CHECK_THROWS_AS(heldout::compare(a, b, calibration_slope{}), heldout::input_error);

        // early stopping ranks by the distance too
        heldout::early_stopping stop(calibration_slope{}, {.patience = 1});
        CHECK_FALSE(stop.update(0.7));
        CHECK_FALSE(stop.update(1.2)); // |0.2| < |0.3|: an improvement
        CHECK(stop.best_epoch() == 1);
        CHECK(stop.update(0.75)); // farther than 1.2: patience 1 runs out
    }
}
