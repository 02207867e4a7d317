// Tests for heldout/loss/hinge.hpp: max(0, 1 - s f) with s = 2y - 1.
#include <heldout/loss/hinge.hpp>

#include <doctest/doctest.h>

TEST_SUITE("loss/hinge") {
    TEST_CASE("worked values: truth 1 is s = +1, truth 0 is s = -1") {
        const heldout::loss::hinge l;
        CHECK(l.value(1.0, 0.25) == 0.75); // 1 - 0.25
        CHECK(l.value(1.0, 2.0) == 0.0);   // margin beyond 1
        CHECK(l.value(0.0, 0.25) == 1.25); // 1 + 0.25
        CHECK(l.value(0.0, -2.0) == 0.0);
        CHECK(l.derivative(1.0, 0.25) == -1.0); // -s inside the margin
        CHECK(l.derivative(0.0, 0.25) == 1.0);
        CHECK(l.derivative(1.0, 2.0) == 0.0);
        CHECK(l.second_derivative(1.0, 0.25) == 0.0);
    }
    TEST_CASE("at the kink s f = 1 the derivative is the subgradient 0") {
        CHECK(heldout::loss::hinge{}.derivative(1.0, 1.0) == 0.0);
        CHECK(heldout::loss::hinge{}.derivative(0.0, -1.0) == 0.0);
    }
    TEST_CASE("derivative agrees with central differences away from the kink") {
        const heldout::loss::hinge l;
        for (double y : {0.0, 1.0})
            for (double f : {-3.0, -0.4, 0.6, 3.0}) {
                const double h = 1e-6;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("it declares binary truth") {
        static_assert(heldout::differentiable_loss<heldout::loss::hinge>);
        CHECK(heldout::loss_truth_v<heldout::loss::hinge> == heldout::truth_kind::binary);
    }
}
