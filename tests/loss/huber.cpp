// Tests for heldout/loss/huber.hpp: Huber (1964) loss with threshold delta.
#include <heldout/loss/huber.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

TEST_SUITE("loss/huber") {
    TEST_CASE("worked values with delta = 1.5") {
        const heldout::loss::huber l{1.5};
        CHECK(l.value(0.0, 1.0) == 0.5);      // |e| = 1 <= 1.5: e^2/2
        CHECK(l.value(0.0, 4.0) == 4.875);    // |e| = 4 > 1.5: 1.5 (4 - 0.75)
        CHECK(l.value(0.0, -4.0) == 4.875);   // symmetric
        CHECK(l.value(0.0, 1.5) == 1.125);    // the boundary: both pieces give 1.125
        CHECK(l.derivative(0.0, 4.0) == 1.5); // clamp(f - y, -delta, delta)
        CHECK(l.derivative(0.0, -4.0) == -1.5);
        CHECK(l.derivative(0.0, 0.25) == 0.25);
        CHECK(l.second_derivative(0.0, 0.25) == 1.0);
        CHECK(l.second_derivative(0.0, 1.5) == 1.0); // the boundary belongs to the quadratic piece
        CHECK(l.second_derivative(0.0, 4.0) == 0.0);
    }
    TEST_CASE("derivatives agree with central differences (both pieces)") {
        const heldout::loss::huber l{0.8};
        for (double y : {-1.0, 0.0, 2.5})
            for (double d : {-3.0, -0.5, 0.3, 2.0}) {
                const double f = y + d, h = 1e-6;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
                CHECK(l.second_derivative(y, f) ==
                      doctest::Approx((l.derivative(y, f + h) - l.derivative(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("the value is continuous at |e| = delta") {
        const heldout::loss::huber l{2.0};
        CHECK(l.value(0.0, std::nextafter(2.0, 3.0)) == doctest::Approx(l.value(0.0, 2.0)).epsilon(1e-15));
    }
    TEST_CASE("a bad delta is refused when a measure is made from it") {
        using M = heldout::measure::mean_loss<heldout::loss::huber>;
        CHECK_THROWS_WITH_AS((void)M{{-1.0}}.accumulator(),
                             "measure mean Huber loss: argument 'delta': must be positive and finite, got -1",
                             heldout::input_error);
        CHECK_THROWS_AS((void)M{{NAN}}.accumulator(), heldout::input_error);
        static_assert(heldout::differentiable_loss<heldout::loss::huber>);
    }
}
