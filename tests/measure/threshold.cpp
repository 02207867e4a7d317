// Tests for heldout/measure/threshold.hpp: cost-optimal threshold and Youden's J.
#include <heldout/measure/threshold.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <vector>

TEST_SUITE("measure/threshold") {
    TEST_CASE("worked example: Davis & Goadrich 2006, worked by hand Check A data") {
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0};
        const std::vector<double> s{0.9, 0.8, 0.7, 0.6, 0.55, 0.5, 0.4, 0.3};
        // Thresholds +inf,.9,.8,.7,.6,.55,.5,.4,.3: TPR 0,1/4,1/4,2/4,3/4,3/4,3/4,1,1; FPR
        // 0,0,1/4,1/4,1/4,2/4,3/4,3/4,1. J = TPR - FPR is largest (1/2) at threshold 0.6.
        const auto j = heldout::youden_threshold(y, s);
        CHECK(j.threshold == 0.6);
        CHECK(j.youden_j == 0.5);
        CHECK(j.true_positive_rate == 0.75);
        CHECK(j.false_positive_rate == 0.25);
        // Equal costs (0-1 loss): expected cost = error rate; pi1 = 1/2.
        // cost(t) = (1/2)(1 - TPR) + (1/2) FPR: minimal 1/4 at 0.6 (and nowhere else).
        Eigen::Matrix2d c01;
        c01 << 0, 1, 1, 0;
        const auto c = heldout::cost_optimal_threshold(y, s, c01);
        CHECK(c.threshold == 0.6);
        CHECK(c.expected_cost == 0.25);
        CHECK(c.positive_prior == 0.5);
        // False negatives 10x as costly: the lowest threshold with TPR = 1 wins, 0.4 (FPR 3/4):
        // cost = 1/2 * 3/4 = 0.375 (at 0.3: 1/2; at 0.6: 1/2 * 1/4 * 10 + 1/2 * 1/4 = 1.375).
        Eigen::Matrix2d c10;
        c10 << 0, 1, 10, 0;
        const auto d = heldout::cost_optimal_threshold(y, s, c10);
        CHECK(d.threshold == 0.4);
        CHECK(d.expected_cost == 0.375);
        // A rare deployment class (prior 1 %) with 0-1 costs: only the top score, which is a
        // positive, is worth predicting: threshold 0.9, cost 0.01 * 3/4 = 0.0075 (+inf: 0.01).
        const auto e = heldout::cost_optimal_threshold(y, s, c01, 0.01);
        CHECK(e.threshold == 0.9);
        CHECK(e.expected_cost == doctest::Approx(0.0075).epsilon(1e-15));
        // ... and with the top score a negative, nothing is predicted positive: threshold +inf.
        std::vector<int> y2(y);
        y2[0] = 0;
        y2[1] = 1;
        const auto f = heldout::cost_optimal_threshold(y2, s, c01, 0.01);
        CHECK(std::isinf(f.threshold));
        CHECK(f.expected_cost == doctest::Approx(0.01).epsilon(1e-15));
    }
    TEST_CASE("numpy brute force over every candidate threshold (ref_threshold.py)") {
        heldout_test::reference_table ref("ref_threshold");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int k = 0; k < cases; ++k) {
            const std::string p = "case" + std::to_string(k) + ".";
            CAPTURE(k);
            const auto y = ref.get_as<int>(p + "truth");
            const auto s = ref.get(p + "scores");
            const auto cv = ref.get(p + "cost");
            Eigen::Matrix2d cost;
            cost << cv[0], cv[1], cv[2], cv[3];
            const double prior = ref.scalar(p + "prior");
            const auto opt = ref.get(p + "optimal");
            const auto c = prior < 0 ? heldout::cost_optimal_threshold(y, s, cost)
                                     : heldout::cost_optimal_threshold(y, s, cost, prior);
            CHECK(c.threshold == opt[0]);
            CHECK(heldout_test::close(c.expected_cost, opt[1], 1e-12, 1e-15));
            CHECK(c.true_positive_rate == doctest::Approx(opt[2]).epsilon(1e-14));
            CHECK(c.false_positive_rate == doctest::Approx(opt[3]).epsilon(1e-14));
            const auto yo = ref.get(p + "youden");
            const auto j = heldout::youden_threshold(y, s);
            CHECK(j.threshold == yo[0]);
            CHECK(j.youden_j == doctest::Approx(yo[1]).epsilon(1e-14));
        }
    }
    TEST_CASE("bad input") {
        const std::vector<int> y{1, 0};
        const std::vector<double> s{0.6, 0.4};
        Eigen::Matrix2d c;
        c << 0, 1, std::numeric_limits<double>::quiet_NaN(), 0;
        CHECK_THROWS_WITH_AS(heldout::cost_optimal_threshold(y, s, c),
                             "heldout::cost_optimal_threshold: argument 'cost': entry not finite",
                             heldout::input_error);
        c << 0, 1, 1, 0;
        CHECK_THROWS_WITH_AS(heldout::cost_optimal_threshold(y, s, c, 1.0),
                             "heldout::cost_optimal_threshold: argument 'positive_prior': must lie in (0, 1), got 1",
                             heldout::input_error);
        const std::vector<int> one{1, 1};
        CHECK_THROWS_AS(heldout::youden_threshold(one, s), heldout::undefined_error);
    }
}
