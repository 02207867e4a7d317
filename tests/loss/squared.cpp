// Tests for heldout/loss/squared.hpp: (y - f)^2 and its derivatives in f.
#include <heldout/loss/squared.hpp>

#include <doctest/doctest.h>

#include <cmath>

namespace {
// Central differences: derivative of value, and of the analytic derivative.
template <class L>
void check_against_differences(const L& l, double y, double f) {
    const double h = 1e-5 * std::fmax(1.0, std::fabs(f));
    const double d = (l.value(y, f + h) - l.value(y, f - h)) / (2 * h);
    const double d2 = (l.derivative(y, f + h) - l.derivative(y, f - h)) / (2 * h);
    CHECK(l.derivative(y, f) == doctest::Approx(d).epsilon(1e-7).scale(1.0));
    CHECK(l.second_derivative(y, f) == doctest::Approx(d2).epsilon(1e-7).scale(1.0));
}
} // namespace

TEST_SUITE("loss/squared") {
    TEST_CASE("worked values: e = y - f = 0.5 gives 0.25, derivative 2(f - y) = -1, second 2") {
        const heldout::loss::squared l;
        CHECK(l.value(2.0, 1.5) == 0.25);
        CHECK(l.derivative(2.0, 1.5) == -1.0);
        CHECK(l.second_derivative(2.0, 1.5) == 2.0);
        CHECK(l.value(-1.0, 2.0) == 9.0); // (-3)^2
    }
    TEST_CASE("derivatives agree with central differences") {
        const heldout::loss::squared l;
        for (double y : {-3.0, 0.0, 0.7, 12.0})
            for (double f : {-2.0, 0.1, 5.0})
                check_against_differences(l, y, f);
    }
    TEST_CASE("it is a differentiable loss on real truth that propagates non-finite input") {
        static_assert(heldout::differentiable_loss<heldout::loss::squared>);
        CHECK(heldout::loss_truth_v<heldout::loss::squared> == heldout::truth_kind::real);
        CHECK(std::isnan(heldout::loss::squared{}.value(NAN, 1.0)));
        CHECK(std::isinf(heldout::loss::squared{}.value(INFINITY, 1.0)));
    }
}
