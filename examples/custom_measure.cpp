// A measure of one's own (examples/custom_measure.hpp) used everywhere heldout takes a
// measure. The data are a seeded scenario of our own: a sensor's true readings and two
// models' predictions, one more precise than the other.
#include "custom_measure.hpp"

#include <cstdio>
#include <iostream>
#include <vector>

int main() {
    const std::size_t n = 400;
    heldout::rng g(2026, 0);
    std::vector<double> y(n), noise(n);
    for (std::size_t i = 0; i < n; ++i) {
        y[i] = 20.0 + 5.0 * g.uniform();
        noise[i] = g.uniform() - 0.5;
    }
    // Two "models": the truth plus noise of half-width 1 (precise) and 3 (rough).
    auto model = [&](double width) {
        return [&, width](std::span<const std::size_t>, std::span<const std::size_t> test) {
            std::vector<double> f;
            for (std::size_t i : test)
                f.push_back(y[i] + 2.0 * width * noise[i]);
            return f;
        };
    };
    const miss_rate m{miss{.tolerance = 0.8}};
    const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 4, .seed = 11};

    // 1. One test set.
    std::vector<double> f(n);
    for (std::size_t i = 0; i < n; ++i)
        f[i] = y[i] + 2.0 * noise[i];
    std::printf("%s on all rows: %.4f\n", m.name().c_str(), heldout::evaluate(m, y, f));

    // 2. Resampling: estimates with intervals, and a paired comparison.
    const auto precise = heldout::evaluate_splits(plan.splits(n), y, model(1.0), m);
    const auto rough = heldout::evaluate_splits(plan.splits(n), y, model(3.0), m);
    std::cout << precise.estimate(m) << '\n' << heldout::compare(precise, rough, m) << '\n';

    // 3. State as bytes (the tolerance travels with it) and a parallel pass.
    auto acc = m.accumulator();
    acc.add(y, f);
    const auto back = heldout::deserialize(heldout::serialize(acc), m);
    const double parallel = heldout::evaluate_parallel(m, y, f, {.threads = 2});
    std::printf("after bytes: %.4f, on two threads: %.4f\n", back.value(), parallel);
    return 0;
}
