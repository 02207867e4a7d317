// Tests for heldout/loss/pinball.hpp: the quantile loss of Koenker & Bassett (1978).
#include <heldout/loss/absolute.hpp>
#include <heldout/loss/pinball.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <doctest/doctest.h>

TEST_SUITE("loss/pinball") {
    TEST_CASE("worked values with tau = 0.9") {
        const heldout::loss::pinball l{0.9};
        CHECK(l.value(3.0, 2.0) == doctest::Approx(0.9)); // e = 1: tau e
        CHECK(l.value(2.0, 3.0) == doctest::Approx(0.1)); // e = -1: (tau - 1) e
        CHECK(l.derivative(3.0, 2.0) == -0.9);
        CHECK(l.derivative(2.0, 3.0) == doctest::Approx(0.1));
        CHECK(l.derivative(2.0, 2.0) == 0.0); // the subgradient 0 at the kink
        CHECK(l.second_derivative(2.0, 3.0) == 0.0);
    }
    TEST_CASE("tau = 0.5 is half the absolute error") {
        const heldout::loss::pinball l{0.5};
        for (double y : {-1.0, 0.0, 2.0})
            for (double f : {-2.0, 0.5, 3.0})
                CHECK(l.value(y, f) == doctest::Approx(0.5 * heldout::loss::absolute{}.value(y, f)));
    }
    TEST_CASE("derivative agrees with central differences away from the kink") {
        const heldout::loss::pinball l{0.25};
        for (double y : {-1.0, 4.0})
            for (double f : {-3.0, 0.0, 6.0}) {
                const double h = 1e-6;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("tau outside (0, 1) is refused") {
        using M = heldout::measure::mean_loss<heldout::loss::pinball>;
        CHECK_THROWS_WITH_AS((void)M{{1.0}}.accumulator(),
                             "measure mean pinball loss: argument 'tau': quantile level must lie in (0, 1), got 1",
                             heldout::input_error);
        CHECK_THROWS_AS((void)M{{0.0}}.accumulator(), heldout::input_error);
        static_assert(heldout::differentiable_loss<heldout::loss::pinball>);
    }
}
