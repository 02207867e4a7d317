// Tests for heldout/stream/parallel.hpp: the thread count never changes the result.
#include <heldout/measure/mean_loss.hpp>
#include <heldout/stream/parallel.hpp>

#include <doctest/doctest.h>

#include <random>
#include <vector>

TEST_SUITE("stream/parallel") {
    TEST_CASE("MSE on 1..4 threads is bit-identical and matches evaluate()") {
        std::mt19937_64 g(5);
        std::normal_distribution<double> d;
        std::vector<float> y(300001), f(300001);
        std::vector<double> w(y.size());
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<float>(d(g));
            f[i] = static_cast<float>(d(g));
            w[i] = (i % 3) * 0.5;
        }
        const double one = heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = 1, .chunk = 4096});
        for (std::size_t t = 2; t <= 4; ++t)
            CHECK(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = t, .chunk = 4096}) == one);
        CHECK(one == doctest::Approx(heldout::evaluate(heldout::measure::mse{}, y, f)).epsilon(1e-14));
        const double w1 = heldout::evaluate_parallel(heldout::measure::mse{}, y, f, w, {.threads = 1, .chunk = 4096});
        CHECK(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, w, {.threads = 3, .chunk = 4096}) == w1);
        CHECK(w1 == doctest::Approx(heldout::evaluate(heldout::measure::mse{}, y, f, w)).epsilon(1e-14));
    }
    TEST_CASE("errors from worker threads reach the caller with the measure's message") {
        std::vector<double> y(10000, 1.0), f(10000, 1.0);
        f[9000] = std::numeric_limits<double>::quiet_NaN();
        CHECK_THROWS_WITH_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = 2, .chunk = 1000}),
                             "measure MSE: argument 'prediction': not finite (nan) at index 9000", heldout::input_error);
        std::vector<double> shorter(5);
        CHECK_THROWS_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, shorter), heldout::input_error);
        CHECK_THROWS_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.chunk = 0}), heldout::input_error);
    }
}
