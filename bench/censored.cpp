// bench_censored: Harrell's C (two sorts + Fenwick sweep over score ranks) against one
// std::sort of the same scores at 1e6 rows, and the O(n^2) pair loop at 2e4 rows (the
// correctness baseline, not a speed target). Compare ratios within one run.
//
//   bench_censored --benchmark_min_time=0.2
//
// Data: heldout::rng(2026); per row event time e = -ln(u1) * 5, censoring c = -ln(u2) * 8,
// time = round(min(e, c), 2 decimals) (ties), event = e <= c, risk = round(-ln(e) + normal-ish
// noise, 3 decimals) (ties in score).
#include <heldout/censored.hpp>
#include <heldout/core/random.hpp>

#include <benchmark/benchmark.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <map>
#include <vector>

namespace {

struct data_set {
    std::vector<double> time, risk;
    std::vector<std::uint8_t> event;
};

const data_set& data(std::size_t n) {
    static std::map<std::size_t, data_set> cache;
    auto it = cache.find(n);
    if (it != cache.end())
        return it->second;
    data_set d;
    heldout::rng g(2026);
    for (std::size_t i = 0; i < n; ++i) {
        const double e = -std::log(1 - g.uniform()) * 5;
        const double c = -std::log(1 - g.uniform()) * 8;
        d.time.push_back(std::round(std::min(e, c) * 100) / 100);
        d.event.push_back(static_cast<std::uint8_t>(e <= c));
        d.risk.push_back(std::round((-std::log(e + 1e-9) + g.uniform() - g.uniform()) * 1000) / 1000);
    }
    return cache.emplace(n, std::move(d)).first->second;
}

void sort_scores(benchmark::State& st) {
    const auto& d = data(static_cast<std::size_t>(st.range(0)));
    std::vector<double> buf(d.risk.size());
    for (auto _ : st) {
        std::copy(d.risk.begin(), d.risk.end(), buf.begin());
        std::sort(buf.begin(), buf.end());
        benchmark::DoNotOptimize(buf.data());
    }
}

void harrell(benchmark::State& st) {
    const auto& d = data(static_cast<std::size_t>(st.range(0)));
    const auto y = heldout::censored(d.time, d.event);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::harrell_c{}, y, d.risk));
}

void uno(benchmark::State& st) {
    const auto& d = data(static_cast<std::size_t>(st.range(0)));
    const auto y = heldout::censored(d.time, d.event);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::uno_c{.horizon = 10}, y, d.risk));
}

void harrell_estimate(benchmark::State& st) {
    const auto& d = data(static_cast<std::size_t>(st.range(0)));
    const auto y = heldout::censored(d.time, d.event);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::concordance_estimate(heldout::measure::harrell_c{}, y, d.risk).se);
}

void pair_loop(benchmark::State& st) {
    const auto& d = data(static_cast<std::size_t>(st.range(0)));
    const std::size_t n = d.time.size();
    for (auto _ : st) {
        double conc = 0, comp = 0;
        for (std::size_t i = 0; i < n; ++i) {
            if (!d.event[i])
                continue;
            for (std::size_t j = 0; j < n; ++j)
                if (d.time[j] > d.time[i] || (d.time[j] == d.time[i] && !d.event[j])) {
                    comp += 1;
                    conc += d.risk[i] > d.risk[j] ? 1.0 : (d.risk[i] == d.risk[j] ? 0.5 : 0.0);
                }
        }
        benchmark::DoNotOptimize(conc / comp);
    }
}

} // namespace

BENCHMARK(sort_scores)->Arg(20000)->Arg(1000000)->Unit(benchmark::kMillisecond);
BENCHMARK(harrell)->Arg(20000)->Arg(1000000)->Unit(benchmark::kMillisecond);
BENCHMARK(uno)->Arg(1000000)->Unit(benchmark::kMillisecond);
BENCHMARK(harrell_estimate)->Arg(1000000)->Unit(benchmark::kMillisecond);
BENCHMARK(pair_loop)->Arg(20000)->Unit(benchmark::kMillisecond);
BENCHMARK_MAIN();
