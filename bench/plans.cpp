// Benchmarks for heldout's plans: k-fold assignment of 1e7 rows beside the baseline
// std::iota + std::shuffle with std::mt19937_64 (a random permutation, the usual way to
// build folds), in the same run; stratified and grouped costs too. The ratio of medians
// (baseline time / heldout time) is printed at the end.
//
//   ./bench_plans --benchmark_min_time=0.2 --benchmark_repetitions=5
#include <heldout/plan.hpp>

#include <benchmark/benchmark.h>

#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <map>
#include <numeric>
#include <random>
#include <string>
#include <vector>

namespace {

constexpr std::size_t rows = 10'000'000;

// Baseline: a fresh random permutation of the rows per iteration (buffer reused).
void baseline_iota_shuffle(benchmark::State& state) {
    std::vector<std::size_t> v(rows);
    std::mt19937_64 gen(7);
    for (auto _ : state) {
        std::iota(v.begin(), v.end(), std::size_t{0});
        std::shuffle(v.begin(), v.end(), gen);
        benchmark::DoNotOptimize(v.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

// heldout: a fresh assignment (a new repeat) and the scan that builds its first split's
// train and test rows, per iteration; buffers reused (allocated and touched before timing).
void kfold_first_split(benchmark::State& state) {
    auto r = heldout::repeated_kfold{.folds = 10, .repeats = 1u << 30, .seed = 7}.splits(rows);
    r.split(0); // allocate and touch the buffers once, as the baseline's vector is
    std::size_t rep = 1;
    for (auto _ : state) {
        const heldout::split& s = r.split(rep++ * 10);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

// heldout: another fold of an assigned repeat (the scan alone).
void kfold_next_fold(benchmark::State& state) {
    auto r = heldout::kfold{.folds = 10, .seed = 7}.splits(rows);
    r.split(0);
    std::size_t f = 0;
    for (auto _ : state) {
        const heldout::split& s = r.split(1 + f++ % 9);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

std::vector<int> make_labels(std::size_t classes) {
    std::vector<int> y(rows);
    std::mt19937_64 gen(3);
    for (auto& v : y)
        v = static_cast<int>(gen() % classes);
    return y;
}

void stratified_first_split(benchmark::State& state) {
    const auto y = make_labels(static_cast<std::size_t>(state.range(0)));
    auto r = heldout::repeated_kfold{.folds = 10, .repeats = 1u << 30, .seed = 7}.splits(heldout::strata(y));
    r.split(0); // allocate and touch the buffers once, as the baseline's vector is
    std::size_t rep = 1;
    for (auto _ : state) {
        const heldout::split& s = r.split(rep++ * 10);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

void grouped_first_split(benchmark::State& state) {
    const auto g = make_labels(static_cast<std::size_t>(state.range(0)));
    auto r = heldout::repeated_kfold{.folds = 10, .repeats = 1u << 30, .seed = 7}.splits(heldout::groups(g));
    r.split(0); // allocate and touch the buffers once, as the baseline's vector is
    std::size_t rep = 1;
    for (auto _ : state) {
        const heldout::split& s = r.split(rep++ * 10);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

// One-off set-up costs, reported for scale: strata(labels) and groups(ids) of 1e7 rows.
void strata_of_labels(benchmark::State& state) {
    const auto y = make_labels(10);
    for (auto _ : state) {
        heldout::strata s(y);
        benchmark::DoNotOptimize(s.ids().data());
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

void bootstrap_replicate(benchmark::State& state) {
    auto r = heldout::bootstrap{.replicates = 1u << 30, .seed = 7}.splits(rows);
    r.split(0);
    std::size_t b = 1;
    for (auto _ : state) {
        const heldout::split& s = r.split(b++);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * rows));
}

// Keeps each benchmark's median (or single) real time for the ratio summary.
class ratio_reporter : public benchmark::ConsoleReporter {
public:
    std::map<std::string, double> time, cpu;
    void ReportRuns(const std::vector<Run>& runs) override {
        for (const Run& r : runs) {
            const std::string name = r.benchmark_name();
            if (r.run_type == Run::RT_Aggregate && r.aggregate_name != "median")
                continue;
            std::string base = r.run_name.function_name;
            if (!r.run_name.args.empty())
                base += "/" + r.run_name.args;
            // An aggregate (median) overrides single runs of the same benchmark.
            if (r.run_type == Run::RT_Aggregate || !time.count(base)) {
                time[base] = r.GetAdjustedRealTime();
                cpu[base] = r.GetAdjustedCPUTime();
            }
            (void)name;
        }
        ConsoleReporter::ReportRuns(runs);
    }
};

} // namespace

BENCHMARK(baseline_iota_shuffle)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(kfold_first_split)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(kfold_next_fold)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(stratified_first_split)->Arg(2)->Arg(10)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(grouped_first_split)->Arg(1000)->Arg(100000)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(strata_of_labels)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(bootstrap_replicate)->Unit(benchmark::kMillisecond)->UseRealTime();

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    ratio_reporter rep;
    benchmark::RunSpecifiedBenchmarks(&rep);
    const auto base = rep.time.find("baseline_iota_shuffle");
    if (base != rep.time.end()) {
        // CPU-time ratios are printed too: on a shared machine wall time includes waiting.
        const double base_cpu = rep.cpu[base->first];
        std::printf("\nRatio to baseline (iota + std::shuffle with mt19937_64, 1e7 rows; > 1 = heldout faster):\n");
        std::printf("  %-36s %8s %8s   %s\n", "", "real", "cpu", "(real ms vs baseline real ms)");
        for (const auto& [name, t] : rep.time)
            if (name != base->first)
                std::printf("  %-36s %7.2fx %7.2fx   (%.1f ms vs %.1f ms)\n", name.c_str(), base->second / t,
                            base_cpu / rep.cpu[name], t, base->second);
    }
    benchmark::Shutdown();
}
