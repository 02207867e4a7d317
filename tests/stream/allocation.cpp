// After the first pass no heap allocation: a second epoch of reset/add/value on every
// accumulator must not call the global operator new (counted by replacing it here).
#include <heldout/measure/mean_loss.hpp>
#include <heldout/stream/early_stopping.hpp>

#include <doctest/doctest.h>

#include <atomic>
#include <cstdlib>
#include <new>
#include <random>
#include <span>
#include <vector>

namespace {
std::atomic<std::size_t> g_allocations{0};
} // namespace

void* operator new(std::size_t n) {
    ++g_allocations;
    if (void* p = std::malloc(n ? n : 1))
        return p;
    throw std::bad_alloc();
}
void* operator new[](std::size_t n) {
    ++g_allocations;
    if (void* p = std::malloc(n ? n : 1))
        return p;
    throw std::bad_alloc();
}
void operator delete(void* p) noexcept { std::free(p); }
void operator delete[](void* p) noexcept { std::free(p); }
void operator delete(void* p, std::size_t) noexcept { std::free(p); }
void operator delete[](void* p, std::size_t) noexcept { std::free(p); }

namespace {
/// Allocations made by one epoch (reset, batches of `batch` rows, value) on acc.
template <class Acc, class T, class P>
std::size_t epoch_allocations(Acc& acc, const T& truth, const P& pred, std::size_t batch) {
    const std::size_t before = g_allocations.load();
    acc.reset();
    for (std::size_t first = 0; first < truth.size(); first += batch) {
        const std::size_t count = std::min(batch, truth.size() - first);
        acc.add(std::span(truth).subspan(first, count), std::span(pred).subspan(first, count));
    }
    volatile double v = acc.value();
    (void)v;
    return g_allocations.load() - before;
}

struct data {
    std::vector<double> y, f;
    std::vector<std::uint8_t> labels, predicted;
    std::vector<float> scores;
    explicit data(std::size_t n) : y(n), f(n), labels(n), predicted(n), scores(n) {
        std::mt19937_64 g(3);
        std::normal_distribution<double> d;
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = d(g);
            f[i] = y[i] + d(g);
            labels[i] = static_cast<std::uint8_t>(f[i] > 0);
            predicted[i] = static_cast<std::uint8_t>(y[i] > 0);
            scores[i] = static_cast<float>(1.0 / (1.0 + std::exp(-y[i])));
        }
    }
};
} // namespace

TEST_SUITE("stream/allocation") {
    TEST_CASE("pointwise accumulators: no allocation in a second epoch") {
        data d(20000);
        auto acc = heldout::measure::mse{}.accumulator();
        epoch_allocations(acc, d.y, d.f, 1000);
        CHECK(epoch_allocations(acc, d.y, d.f, 1000) == 0);
    }
    TEST_CASE("early stopping updates do not allocate") {
        heldout::early_stopping stop{heldout::measure::mse{}, {.patience = 5}};
        const std::size_t before = g_allocations.load();
        for (int e = 0; e < 100; ++e)
            stop.update(1.0 / (1 + e % 7));
        CHECK(g_allocations.load() - before == 0);
    }
}
