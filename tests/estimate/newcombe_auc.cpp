// Tests for heldout/estimate/newcombe_auc.hpp: Newcombe's (2006) score-type interval of an AUC.
#include <heldout/estimate/newcombe_auc.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

TEST_SUITE("estimate/newcombe_auc") {
    TEST_CASE("m = n: se is Hanley & McNeil's (1982) variance, computed by hand") {
        // A = 0.84, 10 and 10: Q1 = A/(2 - A) = 0.7241379, Q2 = 2A^2/(1 + A) = 0.7669565,
        // Var = [A(1 - A) + 9 (Q1 - A^2) + 9 (Q2 - A^2)] / 100 (Hanley & McNeil 1982, eq. 2).
        const double a = 0.84, q1 = a / (2 - a), q2 = 2 * a * a / (1 + a);
        const double var = (a * (1 - a) + 9 * (q1 - a * a) + 9 * (q2 - a * a)) / 100;
        const auto e = heldout::newcombe_auc_interval(a, 10, 10);
        CHECK(e.se == doctest::Approx(std::sqrt(var)).epsilon(1e-14));
        // The bounds solve (A - theta)^2 = z^2 V(theta): check the equation at each bound.
        const double z = 1.959963984540054;
        for (const double th : {e.lower, e.upper})
            CHECK((a - th) * (a - th) ==
                  doctest::Approx(z * z * heldout::detail::newcombe_variance(th, 10, 10)).epsilon(1e-9));
        CHECK(e.lower < a);
        CHECK(a < e.upper);
    }
    TEST_CASE("defined at AUC 0 and 1, inside [0, 1]") {
        const auto one = heldout::newcombe_auc_interval(1.0, 5, 5);
        CHECK(one.upper == 1.0);
        CHECK(one.lower > 0.5);
        CHECK(one.lower < 1.0);
        CHECK(one.se == 0.0);
        const auto zero = heldout::newcombe_auc_interval(0.0, 5, 5);
        CHECK(zero.lower == 0.0);
        CHECK(zero.upper == doctest::Approx(1 - one.lower).epsilon(1e-12)); // symmetry A -> 1 - A
    }
    TEST_CASE("live reference: scipy brentq on the same equation (ref_newcombe.py)") {
        heldout_test::reference_table ref("ref_newcombe");
        const auto count = static_cast<int>(ref.scalar("grid.count"));
        for (int c = 0; c < count; ++c) {
            const std::string k = "grid" + std::to_string(c) + ".";
            const auto& in = ref.get(k + "in");
            const auto& out = ref.get(k + "out");
            CAPTURE(c);
            const auto e = heldout::newcombe_auc_interval(in[0], static_cast<std::size_t>(in[1]),
                                                          static_cast<std::size_t>(in[2]), in[3]);
            CHECK(heldout_test::close(e.lower, out[0], 1e-12, 1e-15));
            CHECK(heldout_test::close(e.upper, out[1], 1e-12, 1e-15));
            CHECK(heldout_test::close(e.se, out[2], 1e-13, 1e-300));
        }
        for (int c = 0; c < 4; ++c) {
            const std::string k = "scores" + std::to_string(c) + ".";
            const auto y = ref.get_as<int>(k + "y");
            const auto& s = ref.get(k + "s");
            const auto& out = ref.get(k + "out");
            CAPTURE(c);
            const auto e = heldout::newcombe_auc_interval(y, s);
            CHECK(heldout_test::close(e.value, out[0], 1e-14));
            CHECK(heldout_test::close(e.lower, out[1], 1e-12));
            CHECK(heldout_test::close(e.upper, out[2], 1e-12));
            CHECK(heldout_test::close(e.se, out[3], 1e-13));
        }
    }
    TEST_CASE("bad input") {
        CHECK_THROWS_WITH_AS(heldout::newcombe_auc_interval(1.5, 3, 3),
                             "heldout::newcombe_auc_interval: argument 'auc': must lie in [0, 1], got 1.5",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::newcombe_auc_interval(0.5, 0, 3),
                             "heldout::newcombe_auc_interval: argument 'positives': at least 1 positive is needed",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::newcombe_auc_interval(0.5, 3, 0), heldout::input_error);
        CHECK_THROWS_AS(heldout::newcombe_auc_interval(0.5, 3, 3, 1.0), heldout::input_error);
        CHECK_THROWS_AS(heldout::newcombe_auc_interval(std::vector<int>{1, 1}, std::vector<double>{0.1, 0.2}),
                        heldout::input_error); // one class only
    }
}
