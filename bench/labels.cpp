// Benchmarks for the label measures: classification error and the confusion matrix on
// 1e6 and 1e7 uint8 labels (binary k = 2, and multiclass k = 5), each beside a plain sum of
// the same two label arrays in the same run. Bytes/s count both arrays (2 bytes a row);
// the summary at the end prints measure bytes/s over baseline bytes/s (target >= 0.8 for
// error and the binary confusion matrix).
//
//   ./bench_labels --benchmark_min_time=0.2
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/confusion_matrix.hpp>

#include <benchmark/benchmark.h>

#include <cstdint>
#include <cstdio>
#include <map>
#include <random>
#include <span>
#include <string>
#include <time.h>
#include <vector>

namespace {

struct label_data {
    std::vector<std::uint8_t> truth, prediction;
};

// Seeded labels; predictions agree with the truth about 80% of the time.
const label_data& data(int k) {
    static std::map<int, label_data> cache;
    auto it = cache.find(k);
    if (it != cache.end())
        return it->second;
    const std::size_t n = 10'000'000;
    label_data d;
    d.truth.resize(n);
    d.prediction.resize(n);
    std::mt19937_64 g(20261201u + static_cast<unsigned>(k)); // benchmark data only
    std::uniform_int_distribution<int> cls(0, k - 1);
    std::uniform_int_distribution<int> pct(0, 99);
    for (std::size_t i = 0; i < n; ++i) {
        d.truth[i] = static_cast<std::uint8_t>(cls(g));
        d.prediction[i] = pct(g) < 80 ? d.truth[i] : static_cast<std::uint8_t>(cls(g));
    }
    return cache.emplace(k, std::move(d)).first->second;
}

// The baseline: a plain, vectorisable sum of both label arrays (32-bit lanes in blocks
// short enough never to wrap, then 64-bit totals) — one read of the same bytes.
std::uint64_t plain_sum(const std::uint8_t* t, const std::uint8_t* p, std::size_t n) {
    std::uint64_t total = 0;
    const std::size_t block = std::size_t(1) << 20; // 2 * 255 * 2^20 < 2^32
    for (std::size_t start = 0; start < n; start += block) {
        const std::size_t end = std::min(n, start + block);
        std::uint32_t s = 0;
        for (std::size_t i = start; i < end; ++i)
            s += static_cast<std::uint32_t>(t[i]) + static_cast<std::uint32_t>(p[i]);
        total += s;
    }
    return total;
}

void set_bytes(benchmark::State& state, std::size_t n) {
    state.SetBytesProcessed(static_cast<std::int64_t>(state.iterations()) * static_cast<std::int64_t>(2 * n));
}

void baseline_sum(benchmark::State& state, int k) {
    const auto& d = data(k);
    const auto n = static_cast<std::size_t>(state.range(0));
    for (auto _ : state)
        benchmark::DoNotOptimize(plain_sum(d.truth.data(), d.prediction.data(), n));
    set_bytes(state, n);
}

// Each iteration times the baseline and the measure back to back on the same arrays (thread
// CPU time), so a change of load on the shared machine hits both; "ratio" = baseline time /
// measure time = measure bytes/s / baseline bytes/s. The reported time is the measure's.
// Thread CPU time: a shared machine that deschedules us does not count against either side.
double cpu_seconds() {
    timespec ts{};
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
    return static_cast<double>(ts.tv_sec) + 1e-9 * static_cast<double>(ts.tv_nsec);
}

template <class Run>
void paired(benchmark::State& state, int k, Run run) {
    const auto& d = data(k);
    const auto n = static_cast<std::size_t>(state.range(0));
    const std::span<const std::uint8_t> t(d.truth.data(), n), p(d.prediction.data(), n);
    double base = 0, meas = 0;
    for (auto _ : state) {
        const double t0 = cpu_seconds();
        benchmark::DoNotOptimize(plain_sum(t.data(), p.data(), n));
        const double t1 = cpu_seconds();
        benchmark::DoNotOptimize(run(t, p));
        const double t2 = cpu_seconds();
        base += t1 - t0;
        meas += t2 - t1;
        state.SetIterationTime(t2 - t1);
    }
    set_bytes(state, n);
    state.counters["baseline_bytes_per_second"] =
        benchmark::Counter(static_cast<double>(state.iterations()) * 2.0 * static_cast<double>(n) / base);
    state.counters["ratio"] = benchmark::Counter(base / meas);
}

void classification_error(benchmark::State& state, int k) {
    auto acc = heldout::measure::classification_error{}.accumulator();
    paired(state, k, [&](auto t, auto p) {
        acc.reset();
        acc.add(t, p);
        return acc.value();
    });
}

void confusion_matrix(benchmark::State& state, int k) {
    auto acc = heldout::measure::confusion_matrix{}.accumulator(); // k inferred from the labels
    paired(state, k, [&](auto t, auto p) {
        acc.reset();
        acc.add(t, p);
        return acc(1, 1);
    });
    if (acc.classes() != static_cast<std::size_t>(k))
        state.SkipWithError("wrong number of classes");
}

void sizes(benchmark::internal::Benchmark* b) { b->Arg(1'000'000)->Arg(10'000'000)->Unit(benchmark::kMicrosecond); }
void paired_sizes(benchmark::internal::Benchmark* b) {
    sizes(b);
    b->UseManualTime();
}

BENCHMARK_CAPTURE(baseline_sum, k2, 2)->Apply(sizes);
BENCHMARK_CAPTURE(classification_error, k2, 2)->Apply(paired_sizes);
BENCHMARK_CAPTURE(confusion_matrix, k2, 2)->Apply(paired_sizes);
BENCHMARK_CAPTURE(baseline_sum, k5, 5)->Apply(sizes);
BENCHMARK_CAPTURE(classification_error, k5, 5)->Apply(paired_sizes);
BENCHMARK_CAPTURE(confusion_matrix, k5, 5)->Apply(paired_sizes);

// Collects the paired counters by name to print the ratios after the run.
class ratio_reporter : public benchmark::ConsoleReporter {
public:
    struct result {
        double bytes = 0, base_bytes = 0, ratio = 0;
    };
    void ReportRuns(const std::vector<Run>& runs) override {
        // With --benchmark_repetitions the median is used, otherwise the single run.
        for (const auto& r : runs) {
            const auto ratio = r.counters.find("ratio");
            if (r.error_occurred || ratio == r.counters.end())
                continue;
            const result x{r.counters.at("bytes_per_second").value, r.counters.at("baseline_bytes_per_second").value,
                           ratio->second.value};
            const std::string name = r.run_name.str();
            if (r.run_type == Run::RT_Aggregate && r.aggregate_name == "median")
                median[name] = x;
            else if (r.run_type == Run::RT_Iteration)
                single[name] = x;
        }
        ConsoleReporter::ReportRuns(runs);
    }
    const result* find(const std::string& name) const {
        if (auto it = median.find(name); it != median.end())
            return &it->second;
        if (auto it = single.find(name); it != single.end())
            return &it->second;
        return nullptr;
    }

private:
    std::map<std::string, result> median, single;
};

} // namespace

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    ratio_reporter rep;
    benchmark::RunSpecifiedBenchmarks(&rep);
    std::printf("\nratio to the plain-sum baseline timed in the same iterations (measure bytes/s / sum bytes/s):\n");
    for (const char* k : {"k2", "k5"})
        for (const char* n : {"1000000", "10000000"})
            for (const char* m : {"classification_error", "confusion_matrix"}) {
                const auto* r = rep.find(std::string(m) + "/" + k + "/" + n + "/manual_time");
                if (r == nullptr)
                    continue;
                std::printf("  %-22s %s n = %-9s %6.2f GB/s vs %6.2f GB/s: ratio %.2f\n", m, k, n, r->bytes / 1e9,
                            r->base_bytes / 1e9, r->ratio);
            }
    benchmark::Shutdown();
    return 0;
}
