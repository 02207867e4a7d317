// Tests for heldout/compare/five_by_two.hpp: 5x2cv paired t and combined 5x2cv F.
#include <heldout/compare/five_by_two.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <vector>

using heldout::five_by_two_test;

TEST_SUITE("compare/five_by_two") {
    TEST_CASE("worked example: p = [[.05 .03] [.02 .04] [.06 .01] [.03 .03] [.04 .00]]") {
        // s_i^2 = .0002 .0002 .00125 0 .0008 (sum .00245): t = .05 / sqrt(.00049), F = .025 / .0049.
        // Check values: R pt / pf (Dietterich 1998; Alpaydin 1999): t = 2.25876975726,
        // p = 0.0734648602265; F = 2.55102040816, p = 0.156502522885.
        const std::vector<double> d{0.05, 0.03, 0.02, 0.04, 0.06, 0.01, 0.03, 0.03, 0.04, 0.00};
        const auto r = five_by_two_test(d);
        CHECK(r.variance_sum == doctest::Approx(0.00245).epsilon(1e-13));
        CHECK(r.first_difference == 0.05);
        CHECK(r.mean_difference == doctest::Approx(0.031).epsilon(1e-14));
        CHECK(heldout_test::close(r.t_statistic, 2.25876975726, 1e-11));
        CHECK(heldout_test::close(r.t_p_value, 0.0734648602265, 1e-10)); // R 2 * pt(-t, 5)
        CHECK(heldout_test::close(r.f_statistic, 2.55102040816, 1e-11));
        CHECK(heldout_test::close(r.f_p_value, 0.156502522885, 1e-10)); // R pf(F, 10, 5, lower = FALSE)
        // The interval inverts the t test: it excludes 0 exactly when p < 0.05.
        CHECK(r.lower < 0);
        CHECK(r.upper > 0);
        const auto r80 = five_by_two_test(d, 0.80); // p = 0.073 < 0.20
        CHECK(r80.lower > 0);
    }
    TEST_CASE("fold order matters for t, not for F") {
        const std::vector<double> d{0.05, 0.03, 0.02, 0.04, 0.06, 0.01, 0.03, 0.03, 0.04, 0.00};
        const std::vector<double> swapped{0.03, 0.05, 0.02, 0.04, 0.06, 0.01, 0.03, 0.03, 0.04, 0.00};
        CHECK(five_by_two_test(swapped).t_statistic == doctest::Approx(0.03 / std::sqrt(0.00049)));
        CHECK(five_by_two_test(swapped).f_statistic == five_by_two_test(d).f_statistic);
    }
    TEST_CASE("live reference: scipy.stats.t and f on random differences") {
        heldout_test::reference_table ref("ref_compare");
        for (int i = 0; i < 4; ++i) {
            const std::string k = "five_by_two" + std::to_string(i) + ".";
            const auto r = five_by_two_test(ref.get(k + "d"), 0.95);
            CHECK(heldout_test::close(r.t_statistic, ref.scalar(k + "t"), 1e-12));
            CHECK(heldout_test::close(r.t_p_value, ref.scalar(k + "t_p"), 1e-11)); // scipy.stats.t.sf
            CHECK(heldout_test::close(r.f_statistic, ref.scalar(k + "f"), 1e-12));
            CHECK(heldout_test::close(r.f_p_value, ref.scalar(k + "f_p"), 1e-11)); // scipy.stats.f.sf
            // scipy.stats.t.isf is accurate to ~1e-10 only (its t quantile): ends to 1e-9 of the se.
            CHECK(std::abs(r.lower - ref.get(k + "ci95")[0]) <= 1e-9 * r.se);
            CHECK(std::abs(r.upper - ref.get(k + "ci95")[1]) <= 1e-9 * r.se);
        }
    }
    TEST_CASE("bad input and the undefined case") {
        CHECK_THROWS_WITH_AS(five_by_two_test(std::vector<double>(9, 0.1)),
                             "heldout::five_by_two_test: argument 'differences': need exactly 10 (5 replications x 2 "
                             "folds, in fold order), got 9",
                             heldout::input_error);
        std::vector<double> d(10, 0.01);
        d[3] = std::numeric_limits<double>::infinity();
        CHECK_THROWS_WITH_AS(five_by_two_test(d),
                             "heldout::five_by_two_test: argument 'differences': not finite (inf) at index 3",
                             heldout::input_error);
        d[3] = 0.02;
        CHECK_THROWS_WITH_AS(five_by_two_test(d, 1.0),
                             "heldout::five_by_two_test: argument 'level': must lie in (0, 1), got 1",
                             heldout::input_error);
        const std::vector<double> same{0.1, 0.1, 0.2, 0.2, 0.0, 0.0, 0.3, 0.3, 0.1, 0.1};
        CHECK_THROWS_AS(five_by_two_test(same), heldout::undefined_error);
    }
}
