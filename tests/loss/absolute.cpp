// Tests for heldout/loss/absolute.hpp: |y - f|, sign derivative, subgradient 0 at the kink.
#include <heldout/loss/absolute.hpp>

#include <doctest/doctest.h>

#include <cmath>

TEST_SUITE("loss/absolute") {
    TEST_CASE("worked values: |2 - 1.5| = 0.5, derivative sign(f - y)") {
        const heldout::loss::absolute l;
        CHECK(l.value(2.0, 1.5) == 0.5);
        CHECK(l.value(1.5, 2.0) == 0.5);
        CHECK(l.derivative(2.0, 1.5) == -1.0); // under-prediction: raising f lowers the loss
        CHECK(l.derivative(1.5, 2.0) == 1.0);
        CHECK(l.second_derivative(1.5, 2.0) == 0.0);
    }
    TEST_CASE("at the kink the derivative is the subgradient 0") {
        CHECK(heldout::loss::absolute{}.derivative(3.0, 3.0) == 0.0);
    }
    TEST_CASE("derivative agrees with central differences away from the kink") {
        const heldout::loss::absolute l;
        for (double y : {-2.0, 0.5, 4.0})
            for (double f : {-3.0, 1.0, 6.0}) {
                const double h = 1e-6;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("concepts and traits") {
        static_assert(heldout::differentiable_loss<heldout::loss::absolute>);
        CHECK(heldout::loss::absolute::measure_name == "MAE");
        CHECK(std::isnan(heldout::loss::absolute{}.value(1.0, NAN)));
    }
}
