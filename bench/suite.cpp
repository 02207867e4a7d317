// The one benchmark binary over every area of heldout, each measured beside a baseline of its
// own in the same run: pointwise measures (MSE) against a plain multi-lane sum, label
// measures against plain counting loops, log loss against the plain sum and the textbook
// two-log loop, exact AUC and DeLong against std::sort, k-fold assignment against std::iota +
// std::shuffle, the bootstrap interval of AUC (B = 200, 1e6 rows) against resampling and
// re-sorting per replicate; and two-thread scaling of evaluate_parallel (reported, never a
// gate: the machines are shared).
//
//   ./bench_suite                                   # console, then a table of ratios
//   ./bench_suite --benchmark_format=json           # JSON on stdout (ratios on stderr)
//   /usr/bin/python3 bench/perf_table.py            # builds, runs, prints README's table
//
// Naming: every pair is "<area>/heldout" and "<area>/baseline" (the baseline's label says
// what it is); ratio = baseline time / heldout time, i.e. heldout's throughput relative to
// the baseline's (> 1: heldout faster). The scaling pairs put 2 threads under "heldout" and
// 1 thread under "baseline", on wall-clock time.
// The focused benchmarks (bench/pointwise.cpp, labels.cpp, ranking.cpp, plans.cpp,
// bootstrap.cpp) go deeper into each area; this suite is the overview a README table needs.
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/balanced_accuracy.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/stream/parallel.hpp>

#include <benchmark/benchmark.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <map>
#include <numeric>
#include <random>
#include <string>
#include <utility>
#include <vector>

namespace {

// ---------------------------------------------------------------- data (invented, seeded)

struct regression_data {
    std::vector<float> y, f;
    explicit regression_data(std::size_t n) : y(n), f(n) {
        std::mt19937_64 g(1);
        std::normal_distribution<float> d;
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = d(g);
            f[i] = y[i] + 0.5f * d(g);
        }
    }
};

struct binary_data {
    std::vector<std::uint8_t> truth;
    std::vector<float> prob; // in (0, 1), float32 rounding makes real ties
    explicit binary_data(std::size_t n) : truth(n), prob(n) {
        std::mt19937_64 g(2);
        std::normal_distribution<double> d;
        for (std::size_t i = 0; i < n; ++i) {
            const double x = d(g);
            truth[i] = static_cast<std::uint8_t>(x + d(g) > 0);
            prob[i] = static_cast<float>(std::clamp(1.0 / (1.0 + std::exp(-1.3 * x)), 1e-6, 1 - 1e-6));
        }
    }
};

struct label_data {
    std::vector<std::uint8_t> truth, pred;
    label_data(std::size_t n, unsigned k) : truth(n), pred(n) {
        std::mt19937_64 g(3);
        for (std::size_t i = 0; i < n; ++i) {
            truth[i] = static_cast<std::uint8_t>(g() % k);
            pred[i] = g() % 4 == 0 ? static_cast<std::uint8_t>(g() % k) : truth[i];
        }
    }
};

constexpr std::size_t pointwise_rows = 10'000'000;
constexpr std::size_t label_rows = 10'000'000;
constexpr std::size_t log_rows = 2'000'000;
constexpr std::size_t rank_rows = 1'000'000;
constexpr std::size_t fold_rows = 10'000'000;
constexpr std::size_t boot_rows = 1'000'000;
constexpr std::size_t boot_replicates = 200;

/// In-cache rows (2 x 40 KB of floats: L2-resident on any current x86 core), where memory
/// bandwidth hides nothing: bounds the ratio on a CPU with more bandwidth per core.
constexpr std::size_t cache_rows = 10'000;
const regression_data& regression_in_cache() {
    static const regression_data d(cache_rows);
    return d;
}
const regression_data& regression() {
    static const regression_data d(pointwise_rows);
    return d;
}
const binary_data& binary(std::size_t n) {
    static std::map<std::size_t, binary_data> cache;
    return cache.try_emplace(n, n).first->second;
}
const label_data& labels(unsigned k) {
    static std::map<unsigned, label_data> cache;
    return cache.try_emplace(k, label_rows, k).first->second;
}

// ---------------------------------------------------------------- baselines (our own, small)

/// The shape of every plain baseline here: term(i) summed in 16 float lanes flushed into
/// double every 4096 rows, no checks, no compensation — what a hand-written loop that reads at
/// memory speed does.
template <class Term>
double plain_lane_sum(std::size_t n, Term term) {
    double total = 0;
    for (std::size_t start = 0; start < n; start += 4096) {
        const std::size_t end = std::min(n, start + 4096);
        std::array<float, 16> lane{};
        std::size_t i = start;
        for (; i + 16 <= end; i += 16)
            for (std::size_t j = 0; j < 16; ++j)
                lane[j] += term(i + j);
        for (; i < end; ++i)
            lane[0] += term(i);
        double s = 0;
        for (float v : lane)
            s += v;
        total += s;
    }
    return total;
}

/// Plain MSE: the lane sum of (y - f)^2 over n.
double plain_sum_squares(const float* y, const float* f, std::size_t n) {
    return plain_lane_sum(n,
                          [y, f](std::size_t i) {
                              const float e = y[i] - f[i];
                              return e * e;
                          }) /
           static_cast<double>(n);
}

/// Plain sum over a byte array and a float array (the read limit for log loss).
double plain_sum_bytes_floats(const std::uint8_t* t, const float* p, std::size_t n) {
    return plain_lane_sum(n, [t, p](std::size_t i) { return p[i] + static_cast<float>(t[i]); });
}

/// Plain sum over two float arrays (the read limit for MSE: the plain-sum baseline, as
/// in bench_pointwise).
double plain_sum_floats(const float* y, const float* f, std::size_t n) {
    return plain_lane_sum(n, [y, f](std::size_t i) { return y[i] + f[i]; });
}

/// The textbook log loss: two logs per row in double.
double textbook_log_loss(const std::uint8_t* t, const float* p, std::size_t n) {
    double s = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const double y = t[i], q = p[i];
        s -= y * std::log(q) + (1 - y) * std::log(1 - q);
    }
    return s / static_cast<double>(n);
}

/// AUC by std::sort of (score, label) pairs and one tie-aware rank-sum pass.
double sort_auc(std::vector<std::pair<float, std::uint8_t>>& rows) {
    std::sort(rows.begin(), rows.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
    double u = 0, below = 0, pos = 0;
    for (std::size_t i = 0; i < rows.size();) {
        double gp = 0, gn = 0;
        const float s = rows[i].first;
        for (; i < rows.size() && rows[i].first == s; ++i)
            (rows[i].second ? gp : gn) += 1;
        u += gp * (below + 0.5 * gn);
        below += gn;
        pos += gp;
    }
    return u / (pos * below);
}

/// DeLong's AUC and standard error by midranks (Sun & Xu 2014) with three std::sorts.
std::pair<double, double> sort_delong(const std::vector<std::uint8_t>& y, const std::vector<float>& s) {
    const std::size_t n = y.size();
    auto midranks = [](std::vector<std::pair<float, std::uint32_t>>& v, std::vector<double>& rank) {
        std::sort(v.begin(), v.end());
        for (std::size_t i = 0; i < v.size();) {
            std::size_t j = i;
            while (j < v.size() && v[j].first == v[i].first)
                ++j;
            const double r = 0.5 * static_cast<double>(i + j + 1); // ranks i+1..j, averaged
            for (std::size_t k = i; k < j; ++k)
                rank[v[k].second] = r;
            i = j;
        }
    };
    std::vector<std::pair<float, std::uint32_t>> all(n), pos, neg;
    for (std::size_t i = 0; i < n; ++i) {
        all[i] = {s[i], static_cast<std::uint32_t>(i)};
        (y[i] ? pos : neg).push_back({s[i], static_cast<std::uint32_t>(i)});
    }
    std::vector<double> r_all(n), r_class(n);
    midranks(all, r_all);
    midranks(pos, r_class);
    midranks(neg, r_class);
    const double m = static_cast<double>(pos.size()), k = static_cast<double>(neg.size());
    double sum10 = 0, sum01 = 0;
    std::vector<double> v10, v01;
    v10.reserve(pos.size());
    v01.reserve(neg.size());
    for (std::size_t i = 0; i < n; ++i) {
        if (y[i])
            v10.push_back((r_all[i] - r_class[i]) / k), sum10 += v10.back();
        else
            v01.push_back(1.0 - (r_all[i] - r_class[i]) / m), sum01 += v01.back();
    }
    const double a = sum10 / m;
    double s10 = 0, s01 = 0;
    for (double v : v10)
        s10 += (v - a) * (v - a);
    for (double v : v01)
        s01 += (v - a) * (v - a);
    return {a, std::sqrt(s10 / (m - 1) / m + s01 / (k - 1) / k)};
}

// ---------------------------------------------------------------- benchmarks

void set_bytes(benchmark::State& st, std::size_t bytes_per_iteration) {
    st.SetBytesProcessed(static_cast<std::int64_t>(st.iterations()) * static_cast<std::int64_t>(bytes_per_iteration));
}

void pointwise_heldout(benchmark::State& st) {
    const auto& d = regression();
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::mse{}, d.y, d.f));
    set_bytes(st, 8 * pointwise_rows);
}
void pointwise_baseline(benchmark::State& st) {
    const auto& d = regression();
    for (auto _ : st)
        benchmark::DoNotOptimize(plain_sum_squares(d.y.data(), d.f.data(), pointwise_rows));
    set_bytes(st, 8 * pointwise_rows);
    st.SetLabel("plain multi-lane sum of (y - f)^2");
}

void pointwise_read_heldout(benchmark::State& st) { pointwise_heldout(st); }
void pointwise_read_baseline(benchmark::State& st) {
    const auto& d = regression();
    for (auto _ : st)
        benchmark::DoNotOptimize(plain_sum_floats(d.y.data(), d.f.data(), pointwise_rows));
    set_bytes(st, 8 * pointwise_rows);
    st.SetLabel("plain multi-lane sum of the same floats (read limit)");
}

void cache_read_baseline(benchmark::State& st) {
    const auto& d = regression_in_cache();
    for (auto _ : st)
        benchmark::DoNotOptimize(plain_sum_floats(d.y.data(), d.f.data(), cache_rows));
    set_bytes(st, 8 * cache_rows);
    st.SetLabel("plain multi-lane sum of the same floats, in cache");
}
void cache_squares_baseline(benchmark::State& st) {
    const auto& d = regression_in_cache();
    for (auto _ : st)
        benchmark::DoNotOptimize(plain_sum_squares(d.y.data(), d.f.data(), cache_rows));
    set_bytes(st, 8 * cache_rows);
    st.SetLabel("plain multi-lane sum of (y - f)^2, in cache");
}
/// MSE over the in-cache rows through clone Which (best_isa(): the pass chosen here).
template <int Which>
void cache_mse_heldout(benchmark::State& st) {
    const auto& d = regression_in_cache();
    const auto which = Which < 0 ? heldout::detail::best_isa() : static_cast<heldout::detail::isa>(Which);
    if (!heldout::detail::isa_supported(which)) {
        st.SkipWithError("this CPU lacks the clone's instructions");
        return;
    }
    for (auto _ : st) {
        auto acc = heldout::measure::mse{}.accumulator();
        acc.add_using(which, d.y, d.f);
        benchmark::DoNotOptimize(acc.value());
    }
    set_bytes(st, 8 * cache_rows);
    if (Which >= 0)
        st.SetLabel(std::string(heldout::detail::isa_name(which)) + " clone forced");
}
constexpr int avx2_forced = static_cast<int>(heldout::detail::isa::avx2);

void error_heldout(benchmark::State& st) {
    const auto& d = labels(2);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::classification_error{}, d.truth, d.pred));
    set_bytes(st, 2 * label_rows);
}
void error_baseline(benchmark::State& st) {
    const auto& d = labels(2);
    for (auto _ : st) {
        std::uint64_t wrong = 0;
        for (std::size_t i = 0; i < label_rows; ++i)
            wrong += d.truth[i] != d.pred[i];
        benchmark::DoNotOptimize(static_cast<double>(wrong) / label_rows);
    }
    set_bytes(st, 2 * label_rows);
    st.SetLabel("plain loop counting y != f");
}

void confusion_heldout(benchmark::State& st) {
    const auto& d = labels(3);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::balanced_accuracy{}, d.truth, d.pred));
    set_bytes(st, 2 * label_rows);
}
void confusion_baseline(benchmark::State& st) {
    const auto& d = labels(3);
    for (auto _ : st) {
        std::array<std::uint64_t, 9> c{};
        for (std::size_t i = 0; i < label_rows; ++i)
            ++c[d.truth[i] * 3u + d.pred[i]];
        double s = 0;
        for (unsigned k = 0; k < 3; ++k)
            s += static_cast<double>(c[4 * k]) / static_cast<double>(c[3 * k] + c[3 * k + 1] + c[3 * k + 2]);
        benchmark::DoNotOptimize(s / 3);
    }
    set_bytes(st, 2 * label_rows);
    st.SetLabel("plain loop ++table[3 y + f]");
}

void log_loss_heldout(benchmark::State& st) {
    const auto& d = binary(log_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(heldout::measure::cross_entropy{}, d.truth, d.prob));
    set_bytes(st, 5 * log_rows);
}
void log_loss_baseline(benchmark::State& st) {
    const auto& d = binary(log_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(textbook_log_loss(d.truth.data(), d.prob.data(), log_rows));
    set_bytes(st, 5 * log_rows);
    st.SetLabel("textbook -(y log p + (1-y) log(1-p)), two std::log");
}
void log_loss_read_heldout(benchmark::State& st) { log_loss_heldout(st); }
void log_loss_read_baseline(benchmark::State& st) {
    const auto& d = binary(log_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(plain_sum_bytes_floats(d.truth.data(), d.prob.data(), log_rows));
    set_bytes(st, 5 * log_rows);
    st.SetLabel("plain multi-lane sum of the same bytes (read limit)");
}

void auc_heldout(benchmark::State& st) {
    const auto& d = binary(rank_rows);
    auto acc = heldout::measure::auc{}.accumulator();
    for (auto _ : st) {
        acc.reset();
        acc.add(d.truth, d.prob);
        benchmark::DoNotOptimize(acc.value());
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * rank_rows));
}
void auc_baseline(benchmark::State& st) {
    const auto& d = binary(rank_rows);
    std::vector<std::pair<float, std::uint8_t>> rows(rank_rows);
    for (auto _ : st) {
        for (std::size_t i = 0; i < rank_rows; ++i)
            rows[i] = {d.prob[i], d.truth[i]};
        benchmark::DoNotOptimize(sort_auc(rows));
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * rank_rows));
    st.SetLabel("std::sort of (score, label) + rank-sum pass");
}

void delong_heldout(benchmark::State& st) {
    const auto& d = binary(rank_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::delong_auc(d.truth, d.prob).se);
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * rank_rows));
}
void delong_baseline(benchmark::State& st) {
    const auto& d = binary(rank_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(sort_delong(d.truth, d.prob).second);
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * rank_rows));
    st.SetLabel("midranks by three std::sorts (Sun & Xu)");
}

void kfold_heldout(benchmark::State& st) {
    // A fresh assignment per iteration (repeat r draws from rng(seed, r)) and its first split.
    auto r = heldout::repeated_kfold{.folds = 10, .repeats = 1u << 30, .seed = 11}.splits(fold_rows);
    r.split(0); // buffers allocated and touched, as the baseline's vector is
    std::size_t rep = 1;
    for (auto _ : st) {
        const heldout::split& s = r.split(rep++ * 10);
        benchmark::DoNotOptimize(s.test.data());
        benchmark::ClobberMemory();
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * fold_rows));
}
void kfold_baseline(benchmark::State& st) {
    std::vector<std::size_t> v(fold_rows);
    std::mt19937_64 g(11);
    for (auto _ : st) {
        std::iota(v.begin(), v.end(), std::size_t{0});
        std::shuffle(v.begin(), v.end(), g);
        benchmark::DoNotOptimize(v.data());
        benchmark::ClobberMemory();
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * fold_rows));
    st.SetLabel("std::iota + std::shuffle (mt19937_64)");
}

void bootstrap_heldout(benchmark::State& st) {
    const auto& d = binary(boot_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::bootstrap_percentile(heldout::measure::auc{}, d.truth, d.prob,
                                                               {.replicates = boot_replicates, .seed = 5})
                                     .lower);
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * boot_rows * boot_replicates));
}
void bootstrap_baseline(benchmark::State& st) {
    // Resample rows (heldout::rng(seed, b).below(n), as the library draws), sort, AUC, per replicate.
    const auto& d = binary(boot_rows);
    std::vector<std::pair<float, std::uint8_t>> rows(boot_rows);
    std::vector<double> reps(boot_replicates);
    for (auto _ : st) {
        for (std::size_t b = 0; b < boot_replicates; ++b) {
            heldout::rng g(5, b);
            for (auto& r : rows) {
                const std::size_t i = g.below(boot_rows);
                r = {d.prob[i], d.truth[i]};
            }
            reps[b] = sort_auc(rows);
        }
        std::sort(reps.begin(), reps.end());
        benchmark::DoNotOptimize(reps[5]);
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations() * boot_rows * boot_replicates));
    st.SetLabel("resample + std::sort + AUC per replicate");
}

template <std::size_t Threads>
void parallel_mse(benchmark::State& st) {
    const auto& d = regression();
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate_parallel(heldout::measure::mse{}, d.y, d.f, {.threads = Threads}));
    set_bytes(st, 8 * pointwise_rows);
    if (Threads == 1)
        st.SetLabel("evaluate_parallel, 1 thread");
}
template <std::size_t Threads>
void parallel_log_loss(benchmark::State& st) {
    const auto& d = binary(log_rows);
    for (auto _ : st)
        benchmark::DoNotOptimize(
            heldout::evaluate_parallel(heldout::measure::cross_entropy{}, d.truth, d.prob, {.threads = Threads}));
    set_bytes(st, 5 * log_rows);
    if (Threads == 1)
        st.SetLabel("evaluate_parallel, 1 thread");
}

// Registration: (area, heldout function, baseline function, target text). Wall-clock time for
// the thread pairs, CPU time of the main thread otherwise.
struct pair_spec {
    const char* area;
    void (*heldout)(benchmark::State&);
    void (*baseline)(benchmark::State&);
    const char* target;
    bool wall;
    bool once; // one iteration (the naive bootstrap takes seconds)
};

const pair_spec pairs[] = {
    {"pointwise: MSE vs read limit, 1e7 float rows", pointwise_read_heldout, pointwise_read_baseline, ">= 0.8", false,
     false},
    {"pointwise: MSE vs float sum of squares, 1e7 rows", pointwise_heldout, pointwise_baseline, "", false, false},
    {"pointwise: MSE vs read limit, 1e4 rows in cache", cache_mse_heldout<-1>, cache_read_baseline, ">= 0.8", false,
     false},
    {"pointwise: MSE (AVX2 forced) vs read limit, 1e4 in cache", cache_mse_heldout<avx2_forced>, cache_read_baseline,
     ">= 0.8", false, false},
    {"pointwise: MSE vs float sum of squares, 1e4 in cache", cache_mse_heldout<-1>, cache_squares_baseline, "", false,
     false},
    {"labels: classification error, 1e7 byte labels", error_heldout, error_baseline, "", false, false},
    {"labels: balanced accuracy (3 x 3 table), 1e7 rows", confusion_heldout, confusion_baseline, "", false, false},
    {"probabilities: log loss vs textbook, 2e6 rows", log_loss_heldout, log_loss_baseline, "", false, false},
    {"probabilities: log loss vs read limit, 2e6 rows", log_loss_read_heldout, log_loss_read_baseline, "", false,
     false},
    {"ranking: exact AUC, 1e6 float scores", auc_heldout, auc_baseline, "", false, false},
    {"ranking: DeLong AUC + SE, 1e6 rows", delong_heldout, delong_baseline, "", false, false},
    {"splits: 10-fold assignment + first split, 1e7 rows", kfold_heldout, kfold_baseline, "", false, false},
    {"bootstrap: AUC percentile interval, B = 200, 1e6 rows", bootstrap_heldout, bootstrap_baseline, ">= 20", false,
     true},
    {"scaling: MSE on 2 threads vs 1, 1e7 rows", parallel_mse<2>, parallel_mse<1>, "reported", true, false},
    {"scaling: log loss on 2 threads vs 1, 2e6 rows", parallel_log_loss<2>, parallel_log_loss<1>, "reported", true,
     false},
};

void register_all() {
    for (const pair_spec& p : pairs) {
        for (int side = 0; side < 2; ++side) {
            const std::string name = std::string(p.area) + (side == 0 ? "/baseline" : "/heldout");
            auto* b = benchmark::RegisterBenchmark(name.c_str(), side == 0 ? p.baseline : p.heldout);
            b->Unit(benchmark::kMillisecond);
            if (p.wall)
                b->UseRealTime();
            if (p.once)
                b->Iterations(1);
        }
    }
}

/// Wraps the chosen reporter and keeps each benchmark's time per iteration (the median when
/// repetitions are asked for, else the single run).
template <class Base>
class recording : public Base {
public:
    struct times {
        double real = 0, cpu = 0;
        bool from_median = false;
    };
    std::map<std::string, times> seen;

    void ReportRuns(const std::vector<benchmark::BenchmarkReporter::Run>& runs) override {
        for (const auto& r : runs) {
            if (r.error_occurred)
                continue;
            const bool median =
                r.run_type == benchmark::BenchmarkReporter::Run::RT_Aggregate && r.aggregate_name == "median";
            if (r.run_type == benchmark::BenchmarkReporter::Run::RT_Aggregate && !median)
                continue;
            const std::string name = r.run_name.function_name; // without /iterations:1, /real_time
            auto& t = seen[name];
            if (t.from_median && !median)
                continue;
            const double unit = benchmark::GetTimeUnitMultiplier(r.time_unit);
            t = {r.GetAdjustedRealTime() / unit, r.GetAdjustedCPUTime() / unit, median};
        }
        Base::ReportRuns(runs);
    }
};

template <class R>
void summary(const R& rep, std::FILE* out) {
    std::fprintf(out, "\nheldout vs baseline, same run (ratio = baseline time / heldout time; > 1: heldout faster)\n");
    for (const pair_spec& p : pairs) {
        const auto h = rep.seen.find(std::string(p.area) + "/heldout");
        const auto b = rep.seen.find(std::string(p.area) + "/baseline");
        if (h == rep.seen.end() || b == rep.seen.end())
            continue;
        const double th = p.wall ? h->second.real : h->second.cpu, tb = p.wall ? b->second.real : b->second.cpu;
        std::fprintf(out, "  %-56s heldout %9.3f ms  baseline %9.3f ms  ratio %6.2f%s%s\n", p.area, th * 1e3, tb * 1e3,
                     tb / th, *p.target ? "  target " : "", p.target);
    }
}

/// Checks, before timing, that each heldout route and its baseline compute the same thing.
bool agree() {
    const auto& d = binary(rank_rows);
    std::vector<std::pair<float, std::uint8_t>> rows(rank_rows);
    for (std::size_t i = 0; i < rank_rows; ++i)
        rows[i] = {d.prob[i], d.truth[i]};
    const double a = heldout::evaluate(heldout::measure::auc{}, d.truth, d.prob), b = sort_auc(rows);
    const auto dl = heldout::delong_auc(d.truth, d.prob);
    const auto sd = sort_delong(d.truth, d.prob);
    const auto& r = regression();
    const double m1 = heldout::evaluate(heldout::measure::mse{}, r.y, r.f);
    const double m2 = plain_sum_squares(r.y.data(), r.f.data(), pointwise_rows);
    const bool ok = std::abs(a - b) < 1e-12 && std::abs(dl.value - sd.first) < 1e-12 &&
                    std::abs(dl.se - sd.second) < 1e-9 * sd.second && std::abs(m1 - m2) < 1e-5 * m1;
    if (!ok)
        std::fprintf(stderr,
                     "suite: routes disagree: AUC %.17g vs %.17g, DeLong se %.17g vs %.17g, MSE %.17g vs %.17g\n", a, b,
                     dl.se, sd.second, m1, m2);
    return ok;
}

} // namespace

int main(int argc, char** argv) {
    bool json = false;
    for (int i = 1; i < argc; ++i)
        json = json || std::strcmp(argv[i], "--benchmark_format=json") == 0;
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv))
        return 1;
    if (!agree())
        return 1;
    register_all();
    if (json) {
        recording<benchmark::JSONReporter> rep;
        benchmark::RunSpecifiedBenchmarks(&rep);
        summary(rep, stderr); // stdout stays one JSON document
    } else {
        recording<benchmark::ConsoleReporter> rep;
        benchmark::RunSpecifiedBenchmarks(&rep);
        summary(rep, stdout);
    }
    benchmark::Shutdown();
    return 0;
}
