// Tests for heldout/planning/test_rows.hpp: test rows for a proportion, an AUC and a McNemar
// comparison. Each returned n is checked three ways: against the live numpy/scipy reference
// (tests/reference/ref_planning.py, which finds n by other routes: a quadratic root, a linear
// scan, Connor's closed form), inverted with formulas written out here (the target holds at n
// and fails at n - 1), and against published worked examples where one is known.
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/planning.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <boost/math/distributions/normal.hpp>

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

using heldout::test_rows_for_auc;
using heldout::test_rows_for_paired_error;
using heldout::test_rows_for_proportion;

namespace {

// Formulas restated here (not taken from the header) so the inversion checks are independent.
double z_of(double level) { return boost::math::quantile(boost::math::normal_distribution<double>(), 0.5 + level / 2); }
// Wilson (1927) interval at p-hat = p, n rows: half of (upper - lower).
double wilson_half(double p, double n, double z) {
    const double centre_scale = 1.0 / (1.0 + z * z / n);
    return centre_scale * z * std::sqrt(p * (1 - p) / n + z * z / (4 * n * n));
}
// Hanley & McNeil (1982): SE of the AUC a with n1 positives, n0 negatives.
double hm_se(double a, double n1, double n0) {
    const double q1 = a / (2 - a), q2 = 2 * a * a / (1 + a);
    return std::sqrt((a * (1 - a) + (n1 - 1) * (q1 - a * a) + (n0 - 1) * (q2 - a * a)) / (n1 * n0));
}
bool auc_target(double a, double prevalence, double h, double level, std::uint64_t n) {
    const double n1 = std::floor(static_cast<double>(n) * prevalence + 0.5); // halves up
    const double n0 = static_cast<double>(n) - n1;
    return n1 >= 1 && n0 >= 1 && z_of(level) * hm_se(a, n1, n0) <= h;
}
// Connor (1987): normal-approximation power of McNemar's test.
double connor_power(double n, double psi, double d, double alpha) {
    const double za = z_of(1 - alpha);
    return boost::math::cdf(boost::math::normal_distribution<double>(),
                            (std::abs(d) * std::sqrt(n) - za * std::sqrt(psi)) / std::sqrt(psi - d * d));
}

} // namespace

TEST_SUITE("planning/test_rows") {
    TEST_CASE("proportion: live reference (numpy.roots of the Wilson quadratic), and inverted") {
        // Source: tests/reference/ref_planning.py, entry prop: p, h, level, n.
        heldout_test::reference_table ref("ref_planning");
        const auto& v = ref.get("prop");
        REQUIRE(v.size() % 4 == 0);
        REQUIRE(v.size() >= 40);
        for (std::size_t i = 0; i < v.size(); i += 4) {
            const double p = v[i], h = v[i + 1], level = v[i + 2];
            const auto expected = static_cast<std::uint64_t>(v[i + 3]);
            CAPTURE(p);
            CAPTURE(h);
            CAPTURE(level);
            const std::uint64_t n = test_rows_for_proportion(p, h, level);
            CHECK(n == expected);
            const double z = z_of(level);
            CHECK(wilson_half(p, static_cast<double>(n), z) <= h);
            if (n > 1)
                CHECK(wilson_half(p, static_cast<double>(n - 1), z) > h);
        }
    }
    TEST_CASE("proportion: the planning half-width is the library's Wilson interval at whole counts") {
        // At p-hat = k/n the planned half-width must be exactly that of heldout::wilson_interval.
        for (const std::uint64_t n : {5u, 40u, 263u, 1000u})
            for (std::uint64_t k = 0; k <= n; k += (n / 5 == 0 ? 1 : n / 5)) {
                const auto w = heldout::wilson_interval(k, n, 0.95);
                const double p = static_cast<double>(k) / static_cast<double>(n);
                CHECK(heldout::detail::planning::wilson_half_width(p, static_cast<double>(n), z_of(0.95)) ==
                      doctest::Approx((w.upper - w.lower) / 2).epsilon(1e-12));
            }
        // Newcombe (1998), Statistics in Medicine 17:857-872, method 3 (Wilson score; table and
        // values from memory), 81 of 263: 0.2553 to 0.3662: half-width 0.05545 to 4 decimals.
        CHECK(std::abs(heldout::detail::planning::wilson_half_width(81.0 / 263.0, 263.0, z_of(0.95)) - 0.05545) < 1e-4);
        // So planning for that precision at p = 81/263 asks for about 263 rows (the rounding of
        // the published bounds moves the answer by a row or so).
        const auto n = test_rows_for_proportion(81.0 / 263.0, (0.3662 - 0.2553) / 2, 0.95);
        CHECK(n >= 260);
        CHECK(n <= 266);
    }
    TEST_CASE("proportion: p = 1/2 in closed form, n = ceil(z^2 / (4 h^2) - z^2)") {
        // At p = 1/2 the half-width is (z/2) / sqrt(n + z^2), so n >= z^2/(4h^2) - z^2: with
        // z = 1.959964, h = 0.05: 384.146 - 3.841 = 380.30 -> 381 (the Wald textbook answer
        // z^2/(4h^2) -> 385 less z^2 rows).
        CHECK(test_rows_for_proportion(0.5, 0.05, 0.95) == 381);
        for (const double h : {0.1, 0.03, 0.001}) {
            const double z = z_of(0.9);
            CHECK(test_rows_for_proportion(0.5, h, 0.9) ==
                  static_cast<std::uint64_t>(std::ceil(z * z / (4 * h * h) - z * z)));
        }
    }
    TEST_CASE("proportion: p = 0 needs fewer rows than p = 1/2, and p and 1 - p agree") {
        CHECK(test_rows_for_proportion(0.0, 0.02, 0.95) < test_rows_for_proportion(0.5, 0.02, 0.95));
        CHECK(test_rows_for_proportion(0.2, 0.02, 0.95) == test_rows_for_proportion(0.8, 0.02, 0.95));
        CHECK(test_rows_for_proportion(1.0, 0.02, 0.95) == test_rows_for_proportion(0.0, 0.02, 0.95));
    }
    TEST_CASE("AUC: live reference (linear scan over n in numpy/scipy), and inverted") {
        // Source: tests/reference/ref_planning.py, entry auc: A, prevalence, h, level, n.
        heldout_test::reference_table ref("ref_planning");
        const auto& v = ref.get("auc");
        REQUIRE(v.size() % 5 == 0);
        REQUIRE(v.size() >= 40);
        for (std::size_t i = 0; i < v.size(); i += 5) {
            const double a = v[i], pi = v[i + 1], h = v[i + 2], level = v[i + 3];
            const auto expected = static_cast<std::uint64_t>(v[i + 4]);
            CAPTURE(a);
            CAPTURE(pi);
            CAPTURE(h);
            CAPTURE(level);
            const std::uint64_t n = test_rows_for_auc(a, pi, h, level);
            CHECK(n == expected);
            CHECK(auc_target(a, pi, h, level, n));
            CHECK_FALSE(auc_target(a, pi, h, level, n - 1));
        }
    }
    TEST_CASE("AUC: Hanley & McNeil (1982) worked example") {
        // Hanley & McNeil (1982), Radiology 143:29-36: the CT example with 51 abnormal and 58
        // normal images, area 0.893, standard error 0.032 (values from memory). Arithmetic:
        // Q1 = 0.893/1.107 = 0.80669, Q2 = 2(0.797449)/1.893 = 0.84252,
        // SE^2 = (0.095551 + 50(0.009242) + 57(0.045071)) / (51 * 58) = 3.1267 / 2958.
        const double se = heldout::detail::planning::hanley_mcneil_se(0.893, 51, 58);
        CHECK(se == doctest::Approx(0.032).epsilon(0.02));
        CHECK(se == doctest::Approx(std::sqrt(3.1267 / 2958.0)).epsilon(1e-4));
        // Inverted: asking for the precision that example had (z SE at n = 109 with 51/109
        // positives) gives back 109 rows.
        const double h = z_of(0.95) * se * (1 + 1e-12);
        CHECK(test_rows_for_auc(0.893, 51.0 / 109.0, h, 0.95) == 109);
    }
    TEST_CASE("AUC: rounding of the positives, halves up") {
        // prevalence 0.25 and n = 10: 2.5 positives -> 3 (halves up), 7 negatives. A target
        // met exactly at (3, 7) and not at n = 9 (round(2.25) = 2, 7) gives n = 10.
        const double a = 0.8;
        const double h = z_of(0.95) * hm_se(a, 3, 7);
        CHECK(hm_se(a, 2, 7) > hm_se(a, 3, 7));
        CHECK(test_rows_for_auc(a, 0.25, h * (1 + 1e-12), 0.95) == 10);
        // A rare class: the answer makes n * prevalence at least one positive.
        const auto n = test_rows_for_auc(0.9, 0.001, 0.5, 0.95);
        CHECK(std::floor(static_cast<double>(n) * 0.001 + 0.5) >= 1);
        CHECK(auc_target(0.9, 0.001, 0.5, 0.95, n));
        CHECK_FALSE(auc_target(0.9, 0.001, 0.5, 0.95, n - 1));
    }
    TEST_CASE("paired error: live reference (Connor's closed form, math.ceil), and inverted") {
        // Source: tests/reference/ref_planning.py, entry mcn: psi, d, alpha, power, n.
        heldout_test::reference_table ref("ref_planning");
        const auto& v = ref.get("mcn");
        REQUIRE(v.size() % 5 == 0);
        REQUIRE(v.size() >= 40);
        for (std::size_t i = 0; i < v.size(); i += 5) {
            const double psi = v[i], d = v[i + 1], alpha = v[i + 2], power = v[i + 3];
            const auto expected = static_cast<std::uint64_t>(v[i + 4]);
            CAPTURE(psi);
            CAPTURE(d);
            CAPTURE(alpha);
            CAPTURE(power);
            const std::uint64_t n = test_rows_for_paired_error(psi, d, alpha, power);
            CHECK(n == expected);
            CHECK(connor_power(static_cast<double>(n), psi, d, alpha) >= power);
            CHECK(connor_power(static_cast<double>(n - 1), psi, d, alpha) < power);
            // The sign of the difference is ignored.
            CHECK(test_rows_for_paired_error(psi, -d, alpha, power) == n);
        }
    }
    TEST_CASE("paired error: Connor's closed form by hand") {
        // n = (z_{0.975} sqrt(psi) + z_{0.9} sqrt(psi - d^2))^2 / d^2 with psi = 0.2, d = 0.1:
        // (1.959964 * 0.447214 + 1.281552 * 0.435890)^2 / 0.01 = (0.876523 + 0.558616)^2 / 0.01
        // = 205.96 -> 206 (own arithmetic; Connor 1987, Biometrics 43:207-211, eq. for n).
        CHECK(test_rows_for_paired_error(0.2, 0.1, 0.05, 0.9) == 206);
        CHECK(test_rows_for_paired_error(0.2, -0.1, 0.05, 0.9) == 206);
    }
    TEST_CASE("the examples of docs/planning.md and the header") {
        // Computed with the numpy/scipy routes of ref_planning.py (scan over n for the AUC:
        // 1340 rows, 268 positives; Connor's closed form 468.57 -> 469).
        CHECK(test_rows_for_proportion(0.1, 0.02, 0.95) == 868);
        CHECK(test_rows_for_auc(0.85, 0.2, 0.03, 0.95) == 1340);
        CHECK(test_rows_for_paired_error(0.15, 0.05, 0.05, 0.8) == 469);
    }
    TEST_CASE("more precision or power costs rows") {
        CHECK(test_rows_for_proportion(0.1, 0.01, 0.95) > test_rows_for_proportion(0.1, 0.02, 0.95));
        CHECK(test_rows_for_proportion(0.1, 0.02, 0.99) > test_rows_for_proportion(0.1, 0.02, 0.95));
        CHECK(test_rows_for_auc(0.8, 0.1, 0.02, 0.95) > test_rows_for_auc(0.8, 0.1, 0.04, 0.95));
        CHECK(test_rows_for_auc(0.8, 0.05, 0.03, 0.95) > test_rows_for_auc(0.8, 0.3, 0.03, 0.95));
        CHECK(test_rows_for_paired_error(0.2, 0.05, 0.05, 0.9) > test_rows_for_paired_error(0.2, 0.05, 0.05, 0.8));
        CHECK(test_rows_for_paired_error(0.2, 0.05, 0.01, 0.8) > test_rows_for_paired_error(0.2, 0.05, 0.05, 0.8));
    }
    TEST_CASE("bad input names the argument") {
        auto argument_of = [](auto&& f) -> std::string {
            try {
                f();
            } catch (const heldout::input_error& e) {
                return e.argument();
            }
            return "(no error)";
        };
        const double nan = std::nan("");
        CHECK(argument_of([] { return test_rows_for_proportion(-0.1, 0.02, 0.95); }) == "expected");
        CHECK(argument_of([] { return test_rows_for_proportion(1.1, 0.02, 0.95); }) == "expected");
        CHECK(argument_of([&] { return test_rows_for_proportion(nan, 0.02, 0.95); }) == "expected");
        CHECK(argument_of([] { return test_rows_for_proportion(0.1, 0.0, 0.95); }) == "half_width");
        CHECK(argument_of([] { return test_rows_for_proportion(0.1, 1.0, 0.95); }) == "half_width");
        CHECK(argument_of([] { return test_rows_for_proportion(0.1, 0.02, 1.0); }) == "level");
        CHECK(argument_of([&] { return test_rows_for_proportion(0.1, 0.02, nan); }) == "level");
        CHECK(argument_of([] { return test_rows_for_auc(1.0, 0.2, 0.02, 0.95); }) == "expected_auc");
        CHECK(argument_of([] { return test_rows_for_auc(0.0, 0.2, 0.02, 0.95); }) == "expected_auc");
        CHECK(argument_of([] { return test_rows_for_auc(0.8, 0.0, 0.02, 0.95); }) == "prevalence");
        CHECK(argument_of([] { return test_rows_for_auc(0.8, 1.0, 0.02, 0.95); }) == "prevalence");
        CHECK(argument_of([] { return test_rows_for_auc(0.8, 0.2, -0.02, 0.95); }) == "half_width");
        CHECK(argument_of([] { return test_rows_for_auc(0.8, 0.2, 0.02, 0.0); }) == "level");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.0, 0.05, 0.05, 0.8); }) == "discordant_rate");
        CHECK(argument_of([] { return test_rows_for_paired_error(1.5, 0.05, 0.05, 0.8); }) == "discordant_rate");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, 0.0, 0.05, 0.8); }) == "difference");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, 0.2, 0.05, 0.8); }) == "difference");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, -0.3, 0.05, 0.8); }) == "difference");
        CHECK(argument_of([&] { return test_rows_for_paired_error(0.2, nan, 0.05, 0.8); }) == "difference");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, 0.05, 0.0, 0.8); }) == "alpha");
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, 0.05, 0.05, 1.0); }) == "power");
        CHECK_THROWS_WITH_AS(test_rows_for_proportion(-0.1, 0.02, 0.95),
                             "heldout::test_rows_for_proportion: argument 'expected': must lie in [0, 1], got -0.1",
                             heldout::input_error);
        // A target beyond 2^53 rows is refused, naming what sets it.
        CHECK_THROWS_WITH_AS(
            test_rows_for_proportion(0.5, 1e-10, 0.95),
            "heldout::test_rows_for_proportion: argument 'half_width': the target needs more than 2^53 "
            "test rows",
            heldout::input_error);
        CHECK(argument_of([] { return test_rows_for_paired_error(0.2, 1e-9, 0.05, 0.8); }) == "difference");
    }
}
