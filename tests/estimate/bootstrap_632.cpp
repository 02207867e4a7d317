// Tests for heldout/estimate/bootstrap_632.hpp: .632 and .632+ estimators, out-of-bag
// bookkeeping and the no-information error.
#include <heldout/estimate/bootstrap_632.hpp>
#include <heldout/loss/squared.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <cstddef>
#include <string_view>
#include <vector>

namespace {
struct absolute {
    static constexpr std::string_view name = "absolute";
    double value(double y, double f) const { return std::abs(y - f); }
};
struct zero_one {
    static constexpr std::string_view name = "zero-one";
    double value(double y, double f) const { return y != f ? 1.0 : 0.0; }
};
} // namespace

TEST_SUITE("estimate/bootstrap_632") {
    TEST_CASE("Efron & Tibshirani 1997, worked by hand: gamma, .632 and .632+ in the three regimes") {
        // y and full-data predictions from Efron & Tibshirani 1997, worked by hand (Efron & Tibshirani 1997 formulas,
        // [SELF]).
        const std::vector<int> y{1, 1, 1, 0, 0, 0, 0, 0, 1, 0};
        const std::vector<int> q{1, 1, 0, 0, 0, 1, 0, 0, 1, 0};
        const double g = heldout::no_information_error_rate(y, q);
        CHECK(heldout_test::close(g, 0.48, 1e-15)); // 0.4 * 0.6 + 0.6 * 0.4
        const std::vector<double> yd(y.begin(), y.end()), qd(q.begin(), q.end());
        CHECK(heldout_test::close(heldout::no_information_error(zero_one{}, yd, qd), 0.48, 1e-15)); // double sum
        // Err1 = 0.35: R' = 0.15/0.28, w = 0.632/(1 - 0.368 R'), .632+ = 0.318078291815
        auto e = heldout::bootstrap_632(0.2, 0.35, g);
        CHECK(heldout_test::close(e.err_632, 0.2948, 1e-14));
        CHECK(heldout_test::close(e.relative_overfitting, 0.535714285714, 1e-11));
        CHECK(heldout_test::close(e.weight, 0.787188612100, 1e-11));
        CHECK(heldout_test::close(e.err_632_plus, 0.318078291815, 1e-11));
        // the equivalent form .632 + (Err1' - err) 0.368 0.632 R'/(1 - 0.368 R')
        const double R = e.relative_overfitting;
        CHECK(
            heldout_test::close(e.err_632_plus, e.err_632 + (0.35 - 0.2) * 0.368 * 0.632 * R / (1 - 0.368 * R), 1e-14));
        // Err1 = 0.55 > gamma (issue 16's worked case, by hand from Efron & Tibshirani 1997
        // eq. (32) with Err1' = min(Err1, gamma) and R' clipped to [0, 1]): Err1' = 0.48, R' = 1,
        // .632 = 0.368 0.2 + 0.632 0.55 = 0.4212, correction (0.48 - 0.2) 0.368 0.632 / 0.632 = 0.10304,
        // .632+ = 0.52424. The weighted form (1 - w) err + w Err1' would give 0.48 here.
        e = heldout::bootstrap_632(0.2, 0.55, g);
        CHECK(e.leave_one_out_capped == 0.48);
        CHECK(e.relative_overfitting == 1.0);
        CHECK(heldout_test::close(e.weight, 1.0, 1e-15));
        CHECK(heldout_test::close(e.err_632, 0.4212, 1e-14));
        CHECK(heldout_test::close(e.err_632_plus, 0.52424, 1e-14));
        // Err1 = 0.15 < err: R' = 0, w = 0.632, .632+ = .632 = 0.1684
        e = heldout::bootstrap_632(0.2, 0.15, g);
        CHECK(e.relative_overfitting == 0.0);
        CHECK(e.weight == 0.632);
        CHECK(heldout_test::close(e.err_632_plus, 0.1684, 1e-14));
        CHECK(heldout_test::close(e.err_632, 0.1684, 1e-14));
        // gamma <= err forces R' = 0 (Efron & Tibshirani 1997 definition)
        e = heldout::bootstrap_632(0.5, 0.6, 0.45);
        CHECK(e.relative_overfitting == 0.0);
        // methods.md section 11: err = 0.3, gamma = 0.25, Err1 = 0.4. R' = 0, so eq. (32) gives
        // .632 = 0.368 0.3 + 0.632 0.4 = 0.3632; the weighted form would give 0.2684 < err.
        e = heldout::bootstrap_632(0.3, 0.4, 0.25);
        CHECK(e.relative_overfitting == 0.0);
        CHECK(heldout_test::close(e.err_632_plus, 0.3632, 1e-14));
        CHECK(e.err_632_plus >= e.apparent);
    }
    TEST_CASE("eq. (32) boundaries: never below the apparent error when Err1 >= err; .632 <= .632+ <= Err1 bound") {
        // Err1 == err: R' = 0, .632+ = .632 = err.
        auto e = heldout::bootstrap_632(0.25, 0.25, 0.5);
        CHECK(e.relative_overfitting == 0.0);
        CHECK(heldout_test::close(e.err_632_plus, 0.25, 1e-15));
        // gamma == err (no room to overfit): R' = 0 by definition, no division by zero.
        e = heldout::bootstrap_632(0.3, 0.5, 0.3);
        CHECK(e.relative_overfitting == 0.0);
        CHECK(heldout_test::close(e.err_632_plus, 0.368 * 0.3 + 0.632 * 0.5, 1e-15));
        // Err1 == gamma: R' = 1 exactly, both forms agree: .632+ = Err1' = gamma.
        e = heldout::bootstrap_632(0.1, 0.4, 0.4);
        CHECK(e.relative_overfitting == 1.0);
        CHECK(heldout_test::close(e.err_632_plus, 0.4, 1e-15));
        // apparent 0 and Err1 far above gamma: .632 = 0.632 0.9 = 0.5688, correction 0.368 0.5 = 0.184.
        e = heldout::bootstrap_632(0.0, 0.9, 0.5);
        CHECK(heldout_test::close(e.err_632_plus, 0.5688 + 0.184, 1e-14));
        // A grid over (err, Err1, gamma) in [0, 1]^3: whenever Err1 >= err the estimate is at least
        // err and at least .632; it never exceeds max(.632, the value with R' = 1).
        for (int a = 0; a <= 20; ++a)
            for (int b = 0; b <= 20; ++b)
                for (int c = 0; c <= 20; ++c) {
                    const double err = a / 20.0, e1 = b / 20.0, gam = c / 20.0;
                    e = heldout::bootstrap_632(err, e1, gam);
                    CAPTURE(err);
                    CAPTURE(e1);
                    CAPTURE(gam);
                    CHECK(e.relative_overfitting >= 0.0);
                    CHECK(e.relative_overfitting <= 1.0);
                    if (e1 >= err) {
                        CHECK(e.err_632_plus >= err - 1e-15);
                        CHECK(e.err_632_plus >= e.err_632 - 1e-15);
                    } else {
                        CHECK(e.err_632_plus == e.err_632); // R' = 0 (Efron & Tibshirani 1997)
                    }
                }
    }
    TEST_CASE("Efron & Tibshirani 1997, worked by hand OOB bookkeeping: Err1 = 0.625, pooled = 0.6, .632 = 0.487") {
        // b1 = {0,0,1,1}: OOB {2,3}; b2 = {1,1,3,3}: OOB {0,2}; b3 = {0,2,3,3}: OOB {1}.
        heldout::out_of_bag_losses oob(4);
        oob.add(std::vector<std::size_t>{2, 3}, std::vector<double>{1, 1});
        oob.add(std::vector<std::size_t>{0, 2}, std::vector<double>{0, 0});
        oob.add(std::vector<std::size_t>{1}, std::vector<double>{1});
        CHECK(heldout_test::close(oob.leave_one_out_error(), 0.625, 1e-15)); // per-point means [0, 1, 0.5, 1]
        CHECK(heldout_test::close(oob.pooled_error(), 0.6, 1e-15));          // 3 / 5 (Efron 1983 eps0)
        CHECK(oob.never_out_of_bag() == 0);
        CHECK(oob.replicates() == 3);
        CHECK(oob.out_of_bag_count(2) == 2);
        CHECK(heldout_test::close(heldout::bootstrap_632(0.25, oob.leave_one_out_error(), 0.5).err_632, 0.487, 1e-14));
    }
    TEST_CASE("points never out of bag are dropped from Err1 and counted") {
        heldout::out_of_bag_losses oob(5);
        oob.add(std::vector<int>{0, 1}, std::vector<double>{0.2, 0.4});
        oob.add(std::vector<int>{1}, std::vector<double>{0.6});
        CHECK(oob.never_out_of_bag() == 3);
        CHECK(heldout_test::close(oob.leave_one_out_error(), (0.2 + 0.5) / 2, 1e-15)); // n' = 2, not 5
        CHECK(heldout_test::close(oob.pooled_error(), 1.2 / 3, 1e-15));
        heldout::out_of_bag_losses none(3);
        CHECK_THROWS_WITH_AS((void)none.leave_one_out_error(),
                             "heldout::out_of_bag_losses: undefined: no row was ever out of bag",
                             heldout::undefined_error);
        CHECK_THROWS_AS((void)none.pooled_error(), heldout::undefined_error);
    }
    TEST_CASE("live reference: numpy double sums for gamma; numpy .632/.632+ formulas with clipping") {
        heldout_test::reference_table ref("ref_intervals");
        for (int c = 0; c < 3; ++c) {
            const std::string k = "noinf.case" + std::to_string(c) + ".";
            const auto y = ref.get_as<int>(k + "y");
            const auto f = ref.get_as<int>(k + "f");
            CHECK(heldout_test::close(heldout::no_information_error_rate(y, f), ref.scalar(k + "zero_one"), 1e-14));
            const auto& yr = ref.get(k + "yr");
            const auto& fr = ref.get(k + "fr");
            CHECK(heldout_test::close(heldout::no_information_squared_error(yr, fr), ref.scalar(k + "squared"), 1e-12));
            CHECK(heldout_test::close(heldout::no_information_error(heldout::loss::squared{}, yr, fr),
                                      ref.scalar(k + "squared"), 1e-12));
            CHECK(heldout_test::close(heldout::no_information_error(absolute{}, yr, fr), ref.scalar(k + "absolute"),
                                      1e-12));
        }
        const auto count = static_cast<int>(ref.scalar("p632.count"));
        for (int c = 0; c < count; ++c) {
            const std::string k = "p632.case" + std::to_string(c) + ".";
            const auto& in = ref.get(k + "in");
            const auto& out = ref.get(k + "out");
            const auto e = heldout::bootstrap_632(in[0], in[1], in[2]);
            CAPTURE(c);
            CHECK(heldout_test::close(e.err_632, out[0], 1e-14));
            CHECK(heldout_test::close(e.leave_one_out_capped, out[1], 1e-14));
            CHECK(heldout_test::close(e.relative_overfitting, out[2], 1e-13, 1e-300));
            CHECK(heldout_test::close(e.weight, out[3], 1e-14));
            CHECK(heldout_test::close(e.err_632_plus, out[4], 1e-13));
        }
    }
    TEST_CASE("bad input") {
        heldout::out_of_bag_losses oob(3);
        CHECK_THROWS_WITH_AS(oob.add(std::vector<int>{0, 3}, std::vector<double>{1, 1}),
                             "heldout::out_of_bag_losses::add: argument 'rows': row 3 outside 0..2 at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(oob.add(std::vector<int>{-1}, std::vector<double>{1}),
                             "heldout::out_of_bag_losses::add: argument 'rows': negative row number at index 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(oob.add(std::vector<int>{0, 1}, std::vector<double>{1}),
                             "heldout::out_of_bag_losses::add: argument 'losses': size 1 differs from size 2 of 'rows'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(oob.add(std::vector<int>{0}, std::vector<double>{std::nan("")}),
                             "heldout::out_of_bag_losses::add: argument 'losses': not finite (nan) at index 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::bootstrap_632(0.1, std::nan(""), 0.5),
                             "heldout::bootstrap_632: argument 'leave_one_out': not finite", heldout::input_error);
        const std::vector<int> y{0, 1, 2}, f{0, -1, 1};
        CHECK_THROWS_WITH_AS(
            heldout::no_information_error_rate(y, f),
            "heldout::no_information_error_rate: argument 'predicted': label -1 is negative at index 1",
            heldout::input_error);
        const std::vector<double> a{1, 2}, b{1};
        CHECK_THROWS_AS(heldout::no_information_squared_error(a, b), heldout::input_error);
    }
}
