// Tests for heldout/loss/poisson.hpp: the unit Poisson deviance with a log link.
#include <heldout/loss/poisson.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

TEST_SUITE("loss/poisson") {
    TEST_CASE("worked values: d = 2 [y log(y/mu) - (y - mu)], mu = e^f") {
        const heldout::loss::poisson l;
        CHECK(std::fabs(l.value(2.0, std::log(2.0))) <= 1e-15); // perfect mean: 0 up to rounding
        CHECK(l.value(0.0, 0.0) == 2.0);                        // y = 0: 2 mu
        // y = 3, mu = 1: 2 (3 log 3 - 2) = 2.5916737320086...
        CHECK(l.value(3.0, 0.0) == doctest::Approx(2 * (3 * std::log(3.0) - 2)).epsilon(1e-15));
        CHECK(l.derivative(3.0, 0.0) == -4.0); // 2 (mu - y)
        CHECK(l.second_derivative(3.0, 0.0) == 2.0);
        CHECK(l.second_derivative(3.0, std::log(5.0)) == doctest::Approx(10.0).epsilon(1e-15));
    }
    TEST_CASE("derivatives agree with central differences in the log-mean") {
        const heldout::loss::poisson l;
        for (double y : {0.0, 1.0, 7.0})
            for (double f : {-2.0, 0.0, 1.5, 3.0}) {
                const double h = 1e-5;
                CHECK(l.derivative(y, f) == doctest::Approx((l.value(y, f + h) - l.value(y, f - h)) / (2 * h)));
                CHECK(l.second_derivative(y, f) ==
                      doctest::Approx((l.derivative(y, f + h) - l.derivative(y, f - h)) / (2 * h)));
            }
    }
    TEST_CASE("a negative count is reported with its index and the loss's domain") {
        using M = heldout::measure::mean_loss<heldout::loss::poisson>;
        const std::vector<double> y{1, 2, -1}, f{0, 0, 0};
        CHECK_THROWS_WITH_AS(heldout::evaluate(M{}, y, f),
                             "measure mean Poisson deviance: argument 'prediction': loss not finite at truth -1, "
                             "prediction 0 (overflow, or outside the loss's domain: y >= 0) at index 2",
                             heldout::input_error);
        CHECK(M{}.name() == "mean Poisson deviance");
        static_assert(heldout::differentiable_loss<heldout::loss::poisson>);
    }
}
