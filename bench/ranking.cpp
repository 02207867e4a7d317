// bench_ranking: exact AUC (radix sort + one tie-aware pass) against a plain std::sort of the
// same scores, for float and double scores and uint8/int/bool labels, at 1e5, 1e6, 1e7 rows;
// delong_test and delong_auc against one AUC on the same 1e6 cases.
//
//   bench_ranking --benchmark_min_time=0.2          # the table, then the ratios
//   bench_ranking --write-data=DIR                  # writes the data for bench/ranking_numpy.py
//
// Every measured function is called once before its timed loop: the first call of a size
// allocates the calling thread's sort buffers (kept and reused afterwards, as in a training
// loop); the std::sort baselines likewise reuse one buffer.
//
// Data (documented so that the numpy script reads the very same bytes): heldout::rng(2026),
// per row y = below(2) (label), u = uniform(); float score = float(0.8 u + 0.2 y) (float32
// rounding creates real ties); double score = 0.8 u + 0.2 y. Files: DIR/labels_<n>.u8,
// DIR/scores_<n>.f32, DIR/scores_<n>.f64 (little-endian, raw), DIR/auc_<n>.txt (the AUCs
// heldout computed, float then double, for the script to check).
#include <heldout/core/random.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/measure/auc.hpp>

#include <benchmark/benchmark.h>

#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <map>
#include <string>
#include <vector>

namespace {

struct data_set {
    std::vector<std::uint8_t> y8;
    std::vector<int> yi;
    std::vector<char> yb_storage; // bool storage without std::vector<bool>
    std::vector<float> sf;
    std::vector<double> sd;
    std::vector<double> sd2; // a second model for delong_test
    std::span<const bool> yb() const { return {reinterpret_cast<const bool*>(yb_storage.data()), yb_storage.size()}; }
};

const data_set& data(std::size_t n) {
    static std::map<std::size_t, data_set> cache;
    auto it = cache.find(n);
    if (it != cache.end())
        return it->second;
    data_set d;
    heldout::rng g(2026);
    d.y8.resize(n);
    d.sf.resize(n);
    d.sd.resize(n);
    d.sd2.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const auto y = static_cast<std::uint8_t>(g.below(2));
        const double u = g.uniform();
        d.y8[i] = y;
        d.sd[i] = 0.8 * u + 0.2 * y;
        d.sf[i] = static_cast<float>(d.sd[i]);
    }
    heldout::rng g2(2027);
    for (std::size_t i = 0; i < n; ++i)
        d.sd2[i] = 0.6 * d.sd[i] + 0.4 * g2.uniform();
    d.yi.assign(d.y8.begin(), d.y8.end());
    d.yb_storage.assign(d.y8.begin(), d.y8.end());
    return cache.emplace(n, std::move(d)).first->second;
}

template <class T>
void sort_baseline(benchmark::State& st) {
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    std::vector<T> buf(n);
    for (auto _ : st) {
        if constexpr (std::is_same_v<T, float>)
            std::copy(d.sf.begin(), d.sf.end(), buf.begin());
        else
            std::copy(d.sd.begin(), d.sd.end(), buf.begin());
        std::sort(buf.begin(), buf.end());
        benchmark::DoNotOptimize(buf.data());
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

// AUC through the public measure (evaluate: a fresh accumulator per call, as users write it).
template <class T, int Label>
void auc_evaluate(benchmark::State& st) {
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    const auto& s = [&]() -> const auto& {
        if constexpr (std::is_same_v<T, float>)
            return d.sf;
        else
            return d.sd;
    }
    ();
    double v = 0;
    auto run = [&] {
        if constexpr (Label == 0)
            v = heldout::evaluate(heldout::measure::auc{}, d.y8, s);
        else if constexpr (Label == 1)
            v = heldout::evaluate(heldout::measure::auc{}, d.yi, s);
        else
            v = heldout::evaluate(heldout::measure::auc{}, d.yb(), s);
    };
    run(); // warm-up: the first call of a size allocates the thread's sort buffers
    for (auto _ : st) {
        run();
        benchmark::DoNotOptimize(v);
    }
    st.counters["auc"] = v;
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

// AUC with one accumulator reused across epochs (reset, add, value): no allocation.
void auc_reused(benchmark::State& st) {
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    auto acc = heldout::measure::auc{}.accumulator();
    acc.add(d.y8, d.sf);
    benchmark::DoNotOptimize(acc.value()); // warm-up
    for (auto _ : st) {
        acc.reset();
        acc.add(d.y8, d.sf);
        benchmark::DoNotOptimize(acc.value());
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

void auc_double_one(benchmark::State& st) { // baseline of the DeLong rows: one AUC on the same doubles
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::auc{}, d.y8, d.sd)); // warm-up
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::auc{}, d.y8, d.sd));
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

void delong_test_two(benchmark::State& st) {
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    benchmark::DoNotOptimize(heldout::delong_test(d.y8, d.sd, d.sd2).z); // warm-up
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::delong_test(d.y8, d.sd, d.sd2).z);
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

void delong_auc_one(benchmark::State& st) {
    const std::size_t n = static_cast<std::size_t>(st.range(0));
    const auto& d = data(n);
    benchmark::DoNotOptimize(heldout::delong_auc(d.y8, d.sd).se); // warm-up
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::delong_auc(d.y8, d.sd).se);
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * n));
}

// Collects CPU and real times per benchmark name for the ratio summary. CPU-time ratios are
// the ones to read on a shared machine: real time also counts the waits for a busy core.
class ratio_reporter : public benchmark::ConsoleReporter {
public:
    std::map<std::string, double> cpu, real;
    void ReportRuns(const std::vector<Run>& runs) override {
        for (const auto& r : runs)
            if (r.run_type == Run::RT_Iteration || r.aggregate_name == "median") {
                std::string name = r.run_name.function_name;
                name += "/";
                name += r.run_name.args;
                cpu[name] = r.GetAdjustedCPUTime();
                real[name] = r.GetAdjustedRealTime();
            }
        ConsoleReporter::ReportRuns(runs);
    }
};

const std::vector<std::int64_t> sizes{100'000, 1'000'000, 10'000'000};

void write_data(const std::string& dir) {
    for (auto n : sizes) {
        const auto& d = data(static_cast<std::size_t>(n));
        const std::string k = std::to_string(n);
        std::ofstream(dir + "/labels_" + k + ".u8", std::ios::binary)
            .write(reinterpret_cast<const char*>(d.y8.data()), static_cast<std::streamsize>(d.y8.size()));
        std::ofstream(dir + "/scores_" + k + ".f32", std::ios::binary)
            .write(reinterpret_cast<const char*>(d.sf.data()), static_cast<std::streamsize>(d.sf.size() * 4));
        std::ofstream(dir + "/scores_" + k + ".f64", std::ios::binary)
            .write(reinterpret_cast<const char*>(d.sd.data()), static_cast<std::streamsize>(d.sd.size() * 8));
        std::ofstream out(dir + "/auc_" + k + ".txt");
        char line[64];
        std::snprintf(line, sizeof line, "%.17g %.17g\n", heldout::evaluate(heldout::measure::auc{}, d.y8, d.sf),
                      heldout::evaluate(heldout::measure::auc{}, d.y8, d.sd));
        out << line;
    }
}

} // namespace

int main(int argc, char** argv) {
    for (int i = 1; i < argc; ++i)
        if (std::strncmp(argv[i], "--write-data=", 13) == 0) {
            write_data(argv[i] + 13);
            return 0;
        }
    for (auto n : sizes) {
        benchmark::RegisterBenchmark("sort_float", sort_baseline<float>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_float_u8", auc_evaluate<float, 0>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_float_int", auc_evaluate<float, 1>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_float_bool", auc_evaluate<float, 2>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_float_u8_reused", auc_reused)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("sort_double", sort_baseline<double>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_double_u8", auc_evaluate<double, 0>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_double_int", auc_evaluate<double, 1>)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("auc_double_bool", auc_evaluate<double, 2>)->Arg(n)->Unit(benchmark::kMillisecond);
    }
    for (std::int64_t n : {std::int64_t{1'000'000}}) {
        benchmark::RegisterBenchmark("delong_base_auc_double", auc_double_one)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("delong_test", delong_test_two)->Arg(n)->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark("delong_auc", delong_auc_one)->Arg(n)->Unit(benchmark::kMillisecond);
    }
    benchmark::Initialize(&argc, argv);
    ratio_reporter rep;
    benchmark::RunSpecifiedBenchmarks(&rep);
    auto ratio = [&](const std::string& a, const std::string& b) {
        if (rep.cpu.count(a) && rep.cpu.count(b))
            std::printf("ratio %-28s / %-31s cpu %.3f  real %.3f\n", a.c_str(), b.c_str(), rep.cpu[a] / rep.cpu[b],
                        rep.real[a] / rep.real[b]);
    };
    std::printf("\nRatios of times in this run (targets: AUC/sort <= 0.3 at 1e7, delong_test/AUC <= 3):\n");
    for (auto n : sizes) {
        std::string k("/"); // (not "/" + ...: g++ 12 -O3 warns falsely, -Wrestrict)
        k += std::to_string(n);
        for (const char* a : {"auc_float_u8", "auc_float_int", "auc_float_bool", "auc_float_u8_reused"})
            ratio(a + k, "sort_float" + k);
        for (const char* a : {"auc_double_u8", "auc_double_int", "auc_double_bool"})
            ratio(a + k, "sort_double" + k);
    }
    ratio("delong_test/1000000", "delong_base_auc_double/1000000");
    ratio("delong_auc/1000000", "delong_base_auc_double/1000000");
    benchmark::Shutdown();
    return 0;
}
