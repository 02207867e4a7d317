// Tests for heldout/loss/logistic.hpp: binary cross-entropy on the logit scale.
#include <heldout/loss/logistic.hpp>

#include <doctest/doctest.h>

#include <cmath>

TEST_SUITE("loss/logistic") {
    TEST_CASE("worked values: f = 0 is p = 1/2, loss log 2, gradient -1/2, curvature 1/4") {
        const heldout::loss::logistic l;
        CHECK(l.value(1.0, 0.0) == doctest::Approx(std::log(2.0)).epsilon(1e-16));
        CHECK(l.value(0.0, 0.0) == doctest::Approx(std::log(2.0)).epsilon(1e-16));
        CHECK(l.derivative(1.0, 0.0) == -0.5);
        CHECK(l.derivative(0.0, 0.0) == 0.5);
        CHECK(l.second_derivative(1.0, 0.0) == 0.25);
        // f = log 3 is p = 3/4: -log(3/4) for y = 1, -log(1/4) for y = 0.
        CHECK(l.value(1.0, std::log(3.0)) == doctest::Approx(-std::log(0.75)).epsilon(1e-15));
        CHECK(l.value(0.0, std::log(3.0)) == doctest::Approx(std::log(4.0)).epsilon(1e-15));
    }
    TEST_CASE("stable at |f| = 1e3: no overflow, no NaN, exact limits") {
        const heldout::loss::logistic l;
        CHECK(l.value(0.0, 1000.0) == 1000.0);
        CHECK(l.value(1.0, 1000.0) == 0.0);
        CHECK(l.value(1.0, -1000.0) == 1000.0);
        CHECK(l.value(0.0, -1000.0) == 0.0);
        CHECK(l.derivative(0.0, 1000.0) == 1.0);
        CHECK(l.derivative(1.0, -1000.0) == -1.0);
        CHECK(l.second_derivative(1.0, 1000.0) == 0.0);
        CHECK(l.second_derivative(1.0, -1000.0) == 0.0);
        // Where the tail still shows: log(1 + e^-40) = e^-40 to double precision.
        CHECK(l.value(1.0, 40.0) == doctest::Approx(std::exp(-40.0)).epsilon(1e-15));
    }
    TEST_CASE("value against a long-double evaluation of log(1 + e^f) - y f") {
        // Self-written reference in long double (64-bit mantissa), beside the check, written
        // as log(1 + e^f) for y = 0 and its equal log(1 + e^-f) for y = 1 (no cancellation).
        const heldout::loss::logistic l;
        for (double f = -30; f <= 30; f += 0.37)
            for (double y : {0.0, 1.0}) {
                const long double lf = y == 1 ? -static_cast<long double>(f) : static_cast<long double>(f);
                const long double ref = std::log1p(std::exp(lf));
                CHECK(l.value(y, f) == doctest::Approx(static_cast<double>(ref)).epsilon(4e-16).scale(0));
            }
    }
    TEST_CASE("derivatives agree with central differences") {
        const heldout::loss::logistic l;
        for (double y : {0.0, 1.0})
            for (double f : {-6.0, -1.0, 0.3, 2.0, 8.0}) {
                const double h = 1e-5;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
                CHECK(l.second_derivative(y, f) ==
                      doctest::Approx((l.derivative(y, f + h) - l.derivative(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("it declares binary truth") {
        static_assert(heldout::differentiable_loss<heldout::loss::logistic>);
        CHECK(heldout::loss_truth_v<heldout::loss::logistic> == heldout::truth_kind::binary);
    }
}
