// Tests for heldout/calibration/reliability.hpp: binned reliability table with Wilson intervals.
#include <heldout/calibration/reliability.hpp>
#include <heldout/measure/calibration_error.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

using heldout::reliability;

TEST_SUITE("calibration/reliability") {
    TEST_CASE("worked example: 4 equal-width bins, empty bins left out, edges right-closed") {
        const std::vector<int> y{0, 1, 0, 1, 1, 1};
        const std::vector<double> p{0.0, 0.25, 0.1, 0.8, 0.9, 1.0};
        // bins [0, .25], (.25, .5], (.5, .75], (.75, 1]: rows {0, 1, 2} and {3, 4, 5}
        const auto b = reliability(y, p, 4);
        REQUIRE(b.size() == 2);
        CHECK(b[0].index == 0);
        CHECK(b[0].count == 3);
        CHECK(b[0].right == 0.25);
        CHECK(b[0].mean_predicted == doctest::Approx(0.35 / 3).epsilon(1e-15));
        CHECK(b[0].observed == doctest::Approx(1.0 / 3));
        CHECK(b[1].index == 3);
        CHECK(b[1].left == 0.75);
        CHECK(b[1].mean_predicted == doctest::Approx(0.9).epsilon(1e-15));
        CHECK(b[1].observed == 1.0);
        // Wilson (1927) for 3 of 3 at 95%: upper 1, lower n / (n + z^2) = 3 / (3 + 1.959964^2)
        CHECK(b[1].upper == 1.0);
        CHECK(b[1].lower == doctest::Approx(3.0 / (3.0 + 1.959963984540054 * 1.959963984540054)).epsilon(1e-13));
    }
    TEST_CASE("live reference: R cut(..., right = TRUE, include.lowest = TRUE) and prop.test(correct = FALSE)") {
        // Source: tests/reference/ref_calibration.R (base R): per non-empty bin, index, count,
        // mean p, k/n and the Wilson interval (prop.test without continuity correction is
        // Wilson's score interval; Newcombe 1998, method 3) at 95% and 80%.
        heldout_test::reference_table ref("ref_calibration");
        for (const std::string c : {"big", "weighted", "small", "extreme"}) {
            const auto p = ref.get(c + ".p");
            const auto y = ref.get_as<int>(c + ".y");
            for (const std::size_t m : {std::size_t{10}, std::size_t{4}}) {
                CAPTURE(c);
                CAPTURE(m);
                const auto r = ref.get("R." + c + ".bins" + std::to_string(m));
                const auto b95 = reliability(y, p, m);
                const auto b80 = reliability(y, p, m, {.level = 0.80});
                REQUIRE(b95.size() * 8 == r.size());
                for (std::size_t j = 0; j < b95.size(); ++j) {
                    CHECK(static_cast<double>(b95[j].index) == r[8 * j]);
                    CHECK(static_cast<double>(b95[j].count) == r[8 * j + 1]);
                    CHECK(heldout_test::close(b95[j].mean_predicted, r[8 * j + 2], 1e-13));
                    CHECK(heldout_test::close(b95[j].observed, r[8 * j + 3], 1e-15));
                    CHECK(heldout_test::close(b95[j].lower, r[8 * j + 4], 1e-12, 1e-15));
                    CHECK(heldout_test::close(b95[j].upper, r[8 * j + 5], 1e-12));
                    CHECK(heldout_test::close(b80[j].lower, r[8 * j + 6], 1e-12, 1e-15));
                    CHECK(heldout_test::close(b80[j].upper, r[8 * j + 7], 1e-12));
                }
            }
        }
    }
    TEST_CASE("equal-count bins: equal counts without ties, ties share a bin, the ECE agrees") {
        std::vector<double> p;
        std::vector<int> y;
        for (int i = 0; i < 100; ++i) {
            p.push_back((i * 37 % 100 + 0.5) / 100.0);
            y.push_back(i % 3 == 0 ? 1 : 0);
        }
        const auto b = reliability(y, p, 4, {.binning = heldout::measure::bin_rule::equal_count});
        REQUIRE(b.size() == 4);
        for (const auto& x : b)
            CHECK(x.count == 25);
        CHECK(b[0].right == 0.245); // t_1: the 25th smallest probability
        CHECK(b[1].left == 0.245);
        CHECK(b[3].right == 1.0);
        // ECE from the table = measure::calibration_error with the same bins
        double ece = 0;
        for (const auto& x : b)
            ece += static_cast<double>(x.count) / 100.0 * std::abs(x.observed - x.mean_predicted);
        const heldout::measure::calibration_error m{.bins = 4, .binning = heldout::measure::bin_rule::equal_count};
        CHECK(ece == doctest::Approx(heldout::evaluate(m, y, p)).epsilon(1e-13));
        const auto w = reliability(y, p, 7);
        double ece_w = 0;
        for (const auto& x : w)
            ece_w += static_cast<double>(x.count) / 100.0 * std::abs(x.observed - x.mean_predicted);
        CHECK(ece_w ==
              doctest::Approx(heldout::evaluate(heldout::measure::calibration_error{.bins = 7}, y, p)).epsilon(1e-13));
        // ties: 60 rows at 0.5 and 40 spread: the tied rows share one bin
        std::vector<double> q(60, 0.5);
        for (int i = 0; i < 40; ++i)
            q.push_back(0.6 + i / 100.0);
        const auto t = reliability(y, q, 4, {.binning = heldout::measure::bin_rule::equal_count});
        std::size_t total = 0;
        for (const auto& x : t)
            total += x.count;
        CHECK(total == 100);
        CHECK(t[0].count == 60);
    }
    TEST_CASE("bad input") {
        const std::vector<int> y{0, 1};
        const std::vector<double> p{0.2, 0.7};
        CHECK_THROWS_WITH_AS(reliability(y, p, 0),
                             "heldout::reliability: argument 'bins': must lie in 1..100000, got 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(reliability(std::vector<int>{0, 2}, p, 3),
                             "heldout::reliability: argument 'truth': label outside the classes 0..1 at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(reliability(y, std::vector<double>{0.2, 1.5}, 3),
                             "heldout::reliability: argument 'probability': probability 1.5 outside [0, 1] at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS(reliability(y, std::vector<double>{0.2}, 3), heldout::input_error);
        CHECK_THROWS_AS(reliability(y, p, 3, {.level = 1.0}), heldout::input_error);
    }
}
