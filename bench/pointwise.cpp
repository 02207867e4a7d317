// Pointwise measures beside a plain-sum baseline over the same arrays: MSE, MAE, binary
// log loss (cross-entropy) and the Brier score on 1e4 (in cache: no memory bandwidth to hide
// the pass's own cost, as on a CPU with more of it per core), 1e6 and 1e7 rows, float32 and double
// predictions (log loss and Brier with uint8 0/1 labels). Each benchmark reports bytes/s;
// the summary printed at the end gives each measure's time and bytes/s relative to its
// baseline. Targets (issue 2): MSE, MAE >= 0.8x the baseline's bytes/s; log loss <= 5x the
// baseline's time, with strict floating-point flags.
//
//   ./bench_pointwise --benchmark_min_time=0.2
//
// The baseline is a multi-lane sum of both arrays: 16 independent lanes in the arrays' own
// types (float or double, labels in uint32 lanes). Note: GCC 12 without -march compiles it
// to scalar adds (about a row a cycle), so it is a weaker bound than bench_suite's read loop. MSE, MAE and log loss are
// also shown through the baseline (SSE2) clone of their pass ("..._baseline_clone") and MSE/MAE through the AVX2 clone
// forced ("..._avx2_clone": the choice where AVX-512 is missing), beside the clone that runs by default (baseline and
// AVX2 results are bit-identical); log loss also through its AVX2 clone, beside the AVX-512 clone it runs by default
// where the CPU has that.
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/mae.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <benchmark/benchmark.h>

#include <array>
#include <cstdint>
#include <cstdio>
#include <map>
#include <random>
#include <string>
#include <vector>

namespace {

template <class P>
struct data_set {
    std::vector<P> truth, prediction; // regression
    std::vector<std::uint8_t> label;  // binary truth
    std::vector<P> probability;       // P(y = 1)
};

template <class P>
const data_set<P>& data(std::size_t n) {
    static std::map<std::size_t, data_set<P>> cache;
    auto it = cache.find(n);
    if (it != cache.end())
        return it->second;
    data_set<P> d;
    std::mt19937_64 g(42); // benchmark data only
    std::normal_distribution<double> z;
    std::uniform_real_distribution<double> u(0.0005, 0.9995);
    d.truth.resize(n);
    d.prediction.resize(n);
    d.label.resize(n);
    d.probability.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        d.truth[i] = static_cast<P>(z(g));
        d.prediction[i] = static_cast<P>(d.truth[i] + 0.5 * z(g));
        d.probability[i] = static_cast<P>(u(g));
        d.label[i] = static_cast<std::uint8_t>(g() & 1);
    }
    return cache.emplace(n, std::move(d)).first->second;
}

// The plain-sum baseline: 16 lanes of each array's own type.
template <class A, class B>
double plain_sum(const std::vector<A>& a, const std::vector<B>& b) {
    constexpr std::size_t L = 16;
    using SA = std::conditional_t<std::is_floating_point_v<A>, A, std::uint32_t>;
    using SB = std::conditional_t<std::is_floating_point_v<B>, B, std::uint32_t>;
    std::array<SA, L> sa{};
    std::array<SB, L> sb{};
    const std::size_t n = a.size();
    std::size_t i = 0;
    for (; i + L <= n; i += L)
        for (std::size_t j = 0; j < L; ++j) {
            sa[j] += static_cast<SA>(a[i + j]);
            sb[j] += static_cast<SB>(b[i + j]);
        }
    double t = 0;
    for (std::size_t j = 0; j < L; ++j)
        t += static_cast<double>(sa[j]) + static_cast<double>(sb[j]);
    for (; i < n; ++i)
        t += static_cast<double>(a[i]) + static_cast<double>(b[i]);
    return t;
}

template <class A, class B>
void set_bytes(benchmark::State& s, const std::vector<A>& a, const std::vector<B>& b) {
    s.SetBytesProcessed(static_cast<std::int64_t>(s.iterations()) *
                        static_cast<std::int64_t>(a.size() * sizeof(A) + b.size() * sizeof(B)));
}

template <class P>
void baseline_regression(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    for (auto _ : s)
        benchmark::DoNotOptimize(plain_sum(d.truth, d.prediction));
    set_bytes(s, d.truth, d.prediction);
}
template <class P>
void baseline_binary(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    for (auto _ : s)
        benchmark::DoNotOptimize(plain_sum(d.probability, d.label));
    set_bytes(s, d.probability, d.label);
}
template <class M, class P>
void regression(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    for (auto _ : s)
        benchmark::DoNotOptimize(heldout::evaluate(M{}, d.truth, d.prediction));
    set_bytes(s, d.truth, d.prediction);
}
template <class M, class P>
void binary(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    for (auto _ : s)
        benchmark::DoNotOptimize(heldout::evaluate(M{}, d.label, d.probability));
    set_bytes(s, d.probability, d.label);
}
template <class P, heldout::detail::isa Clone>
void log_loss_clone(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    if (!heldout::detail::isa_supported(Clone)) {
        s.SkipWithError("this CPU lacks the clone's instructions");
        return;
    }
    for (auto _ : s) {
        auto acc = heldout::measure::cross_entropy{}.accumulator();
        acc.add_with(Clone, d.label, d.probability);
        benchmark::DoNotOptimize(acc.value());
    }
    set_bytes(s, d.probability, d.label);
}
template <class P>
void log_loss_baseline_clone(benchmark::State& s) {
    log_loss_clone<P, heldout::detail::isa::baseline>(s);
}
template <class P>
void log_loss_avx2_clone(benchmark::State& s) {
    log_loss_clone<P, heldout::detail::isa::avx2>(s);
}

template <class M, class P, heldout::detail::isa Clone>
void regression_clone(benchmark::State& s) {
    const auto& d = data<P>(static_cast<std::size_t>(s.range(0)));
    if (!heldout::detail::isa_supported(Clone)) {
        s.SkipWithError("this CPU lacks the clone's instructions");
        return;
    }
    for (auto _ : s) {
        auto acc = M{}.accumulator();
        acc.add_using(Clone, d.truth, d.prediction);
        benchmark::DoNotOptimize(acc.value());
    }
    set_bytes(s, d.truth, d.prediction);
}
template <class M, class P>
void regression_baseline_clone(benchmark::State& s) {
    regression_clone<M, P, heldout::detail::isa::baseline>(s);
}
// The AVX2 clone forced where AVX-512 is present (the choice on a CPU without AVX-512, and
// the 256-bit path a Zen 4 core runs at the same width as its double-pumped 512-bit one).
template <class M, class P>
void regression_avx2_clone(benchmark::State& s) {
    regression_clone<M, P, heldout::detail::isa::avx2>(s);
}

using heldout::measure::brier_score;
using heldout::measure::cross_entropy;
using heldout::measure::mae;
using heldout::measure::mse;

#define HELDOUT_BENCH(...)                                                                                             \
    BENCHMARK(__VA_ARGS__)->Arg(10'000)->Arg(1'000'000)->Arg(10'000'000)->Unit(benchmark::kMillisecond)
HELDOUT_BENCH(baseline_regression<float>);
HELDOUT_BENCH(regression<mse, float>);
HELDOUT_BENCH(regression<mae, float>);
HELDOUT_BENCH(regression_baseline_clone<mse, float>);
HELDOUT_BENCH(regression_baseline_clone<mae, float>);
HELDOUT_BENCH(regression_avx2_clone<mse, float>);
HELDOUT_BENCH(regression_avx2_clone<mae, float>);
HELDOUT_BENCH(baseline_regression<double>);
HELDOUT_BENCH(regression<mse, double>);
HELDOUT_BENCH(regression<mae, double>);
HELDOUT_BENCH(regression_baseline_clone<mse, double>);
HELDOUT_BENCH(regression_baseline_clone<mae, double>);
HELDOUT_BENCH(regression_avx2_clone<mse, double>);
HELDOUT_BENCH(regression_avx2_clone<mae, double>);
HELDOUT_BENCH(baseline_binary<float>);
HELDOUT_BENCH(binary<cross_entropy, float>);
HELDOUT_BENCH(log_loss_baseline_clone<float>);
HELDOUT_BENCH(log_loss_avx2_clone<float>);
HELDOUT_BENCH(binary<brier_score, float>);
HELDOUT_BENCH(baseline_binary<double>);
HELDOUT_BENCH(binary<cross_entropy, double>);
HELDOUT_BENCH(log_loss_baseline_clone<double>);
HELDOUT_BENCH(log_loss_avx2_clone<double>);
HELDOUT_BENCH(binary<brier_score, double>);

// Collects CPU times (steadier than wall time on a shared machine; both runs are
// single-threaded) to print each measure against its baseline at the end.
class ratio_reporter : public benchmark::ConsoleReporter {
public:
    void ReportRuns(const std::vector<Run>& runs) override {
        for (const auto& r : runs)
            if (r.run_type == Run::RT_Iteration && r.error_occurred == false)
                times[r.benchmark_name()] = r.GetAdjustedCPUTime();
        ConsoleReporter::ReportRuns(runs);
    }
    std::map<std::string, double> times;
};

std::string arg_of(const std::string& name) { return name.substr(name.rfind('/')); }

} // namespace

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    ratio_reporter rep;
    benchmark::RunSpecifiedBenchmarks(&rep);
    std::printf("\nmeasure vs plain-sum baseline over the same arrays, CPU time (time ratio; bytes/s ratio = 1 / "
                "time ratio)\n");
    std::printf("clone in use: %s (log loss, MSE and MAE; the Brier score uses AVX2 where AVX-512 is present)\n",
                heldout::detail::isa_name(heldout::detail::best_isa()));
    for (const auto& [name, t] : rep.times) {
        if (name.rfind("baseline_", 0) == 0)
            continue;
        const std::string type = name.find("double>") != std::string::npos ? "double" : "float";
        const bool bin = name.rfind("binary", 0) == 0 || name.rfind("log_loss", 0) == 0;
        const std::string base =
            std::string(bin ? "baseline_binary<" : "baseline_regression<") + type + ">" + arg_of(name);
        auto it = rep.times.find(base);
        if (it == rep.times.end())
            continue;
        std::printf("  %-46s time %6.2fx   bytes/s %5.2fx\n", name.c_str(), t / it->second, it->second / t);
    }
    benchmark::Shutdown();
}
