// bench_query: NDCG@10 and recall@10 over 1e7 rows (1e5 queries x 100 items, float scores,
// relevance 0..4) by heldout (tie-exact, selection of the head) against the textbook way in
// the same run: copy each query, std::sort it by score, sum the discounted gains of the top
// 10 (and sort the relevances for the ideal DCG), or count the relevant items of the top 10.
//
//   bench_query --benchmark_min_time=0.2        # the table, then the ratios textbook / heldout
//
// Data (heldout::rng(2026)): query i holds rows 100 i .. 100 i + 99 (contiguous); per row
// u = uniform(), relevance = below(5) when u < 0.3 else 0 (about 1 row in 4 relevant),
// score = float(0.2 * relevance + uniform()) (float32 rounding leaves a few ties). The
// heldout variants: a fresh accumulator per call (heldout::evaluate), and one accumulator
// reset and reused (no allocation after the first call, as in a training loop). The same
// measures on shuffled rows (queries not contiguous: regrouped by a counting pass) show the
// grouping cost.
#include <heldout/core/random.hpp>
#include <heldout/query.hpp>

#include <benchmark/benchmark.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <string>
#include <utility>
#include <vector>

namespace {

constexpr std::size_t queries = 100'000;
constexpr std::size_t items = 100;
constexpr std::size_t cutoff = 10;

struct data_set {
    std::vector<std::int32_t> q;
    std::vector<std::uint8_t> rel;
    std::vector<float> s;
    std::vector<std::int32_t> q_shuffled;
    std::vector<std::uint8_t> rel_shuffled;
    std::vector<float> s_shuffled;
};

const data_set& data() {
    static const data_set d = [] {
        data_set x;
        heldout::rng g(2026);
        const std::size_t n = queries * items;
        x.q.resize(n);
        x.rel.resize(n);
        x.s.resize(n);
        for (std::size_t i = 0; i < n; ++i) {
            x.q[i] = static_cast<std::int32_t>(i / items);
            const double u = g.uniform();
            x.rel[i] = u < 0.3 ? static_cast<std::uint8_t>(g.below(5)) : std::uint8_t{0};
            x.s[i] = static_cast<float>(0.2 * x.rel[i] + g.uniform());
        }
        std::vector<std::size_t> perm(n);
        for (std::size_t i = 0; i < n; ++i)
            perm[i] = i;
        heldout::rng h(7);
        heldout::shuffle(std::span<std::size_t>(perm), h);
        x.q_shuffled.resize(n);
        x.rel_shuffled.resize(n);
        x.s_shuffled.resize(n);
        for (std::size_t i = 0; i < n; ++i) {
            x.q_shuffled[i] = x.q[perm[i]];
            x.rel_shuffled[i] = x.rel[perm[i]];
            x.s_shuffled[i] = x.s[perm[i]];
        }
        return x;
    }();
    return d;
}

// ---- the textbook way: copy the query, sort by score, sum (ties in input order)

struct textbook_buffers {
    std::vector<std::pair<float, std::uint8_t>> items;
    std::vector<std::uint8_t> rel;
};

double textbook_ndcg(const data_set& d, textbook_buffers& b) {
    double total = 0;
    std::size_t scored = 0;
    for (std::size_t qi = 0; qi < queries; ++qi) {
        const std::size_t first = qi * items;
        b.items.clear();
        b.rel.clear();
        for (std::size_t i = first; i < first + items; ++i) {
            b.items.emplace_back(d.s[i], d.rel[i]);
            b.rel.push_back(d.rel[i]);
        }
        std::sort(b.items.begin(), b.items.end(), [](const auto& x, const auto& y) { return x.first > y.first; });
        std::sort(b.rel.begin(), b.rel.end(), [](std::uint8_t x, std::uint8_t y) { return x > y; });
        double dcg = 0, idcg = 0;
        for (std::size_t p = 0; p < cutoff; ++p) {
            const double disc = 1.0 / std::log2(static_cast<double>(p) + 2.0);
            dcg += (std::exp2(static_cast<double>(b.items[p].second)) - 1.0) * disc;
            idcg += (std::exp2(static_cast<double>(b.rel[p])) - 1.0) * disc;
        }
        if (idcg > 0) {
            total += dcg / idcg;
            ++scored;
        }
    }
    return total / static_cast<double>(scored);
}

double textbook_recall(const data_set& d, textbook_buffers& b) {
    double total = 0;
    std::size_t scored = 0;
    for (std::size_t qi = 0; qi < queries; ++qi) {
        const std::size_t first = qi * items;
        b.items.clear();
        std::size_t relevant = 0;
        for (std::size_t i = first; i < first + items; ++i) {
            b.items.emplace_back(d.s[i], d.rel[i]);
            relevant += d.rel[i] > 0 ? 1u : 0u;
        }
        std::sort(b.items.begin(), b.items.end(), [](const auto& x, const auto& y) { return x.first > y.first; });
        std::size_t hits = 0;
        for (std::size_t p = 0; p < cutoff; ++p)
            hits += b.items[p].second > 0 ? 1u : 0u;
        if (relevant > 0) {
            total += static_cast<double>(hits) / static_cast<double>(relevant);
            ++scored;
        }
    }
    return total / static_cast<double>(scored);
}

template <int Which>
void textbook(benchmark::State& st) {
    const auto& d = data();
    textbook_buffers b;
    benchmark::DoNotOptimize(Which == 0 ? textbook_ndcg(d, b) : textbook_recall(d, b));
    for (auto _ : st)
        benchmark::DoNotOptimize(Which == 0 ? textbook_ndcg(d, b) : textbook_recall(d, b));
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations()) * static_cast<std::int64_t>(queries * items));
}

// ---- heldout

template <class M>
void heldout_fresh(benchmark::State& st) {
    const auto& d = data();
    const M m{.k = cutoff};
    benchmark::DoNotOptimize(heldout::evaluate(m, heldout::by_query(d.q, d.rel), d.s));
    for (auto _ : st)
        benchmark::DoNotOptimize(heldout::evaluate(m, heldout::by_query(d.q, d.rel), d.s));
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations()) * static_cast<std::int64_t>(queries * items));
}

template <class M, bool Shuffled>
void heldout_reused(benchmark::State& st) {
    const auto& d = data();
    auto acc = M{.k = cutoff}.accumulator();
    const auto& q = Shuffled ? d.q_shuffled : d.q;
    const auto& rel = Shuffled ? d.rel_shuffled : d.rel;
    const auto& s = Shuffled ? d.s_shuffled : d.s;
    acc.add(heldout::by_query(q, rel), s);
    for (auto _ : st) {
        acc.reset();
        acc.add(heldout::by_query(q, rel), s);
        benchmark::DoNotOptimize(acc.value());
    }
    st.SetItemsProcessed(static_cast<std::int64_t>(st.iterations()) * static_cast<std::int64_t>(queries * items));
}

class ratio_reporter : public benchmark::ConsoleReporter {
public:
    std::map<std::string, double> cpu, real;
    void ReportRuns(const std::vector<Run>& runs) override {
        for (const auto& r : runs)
            if (r.run_type == Run::RT_Iteration || r.aggregate_name == "median") {
                cpu[r.run_name.function_name] = r.GetAdjustedCPUTime();
                real[r.run_name.function_name] = r.GetAdjustedRealTime();
            }
        ConsoleReporter::ReportRuns(runs);
    }
};

} // namespace

int main(int argc, char** argv) {
    using heldout::measure::ndcg;
    using heldout::measure::recall_at;
    benchmark::RegisterBenchmark("textbook_ndcg10", textbook<0>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_ndcg10", heldout_fresh<ndcg>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_ndcg10_reused", heldout_reused<ndcg, false>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_ndcg10_shuffled", heldout_reused<ndcg, true>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("textbook_recall10", textbook<1>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_recall10", heldout_fresh<recall_at>)->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_recall10_reused", heldout_reused<recall_at, false>)
        ->Unit(benchmark::kMillisecond);
    benchmark::RegisterBenchmark("heldout_recall10_shuffled", heldout_reused<recall_at, true>)
        ->Unit(benchmark::kMillisecond);
    benchmark::Initialize(&argc, argv);
    ratio_reporter rep;
    benchmark::RunSpecifiedBenchmarks(&rep);
    auto ratio = [&](const std::string& base, const std::string& a) {
        if (rep.cpu.count(a) && rep.cpu.count(base))
            std::printf("speed-up %-26s over %-18s cpu %.2fx  real %.2fx\n", a.c_str(), base.c_str(),
                        rep.cpu[base] / rep.cpu[a], rep.real[base] / rep.real[a]);
    };
    std::printf("\nSpeed-ups in this run, textbook time / heldout time (target: >= 2 for NDCG@10 and recall@10):\n");
    for (const char* a : {"heldout_ndcg10", "heldout_ndcg10_reused", "heldout_ndcg10_shuffled"})
        ratio("textbook_ndcg10", a);
    for (const char* a : {"heldout_recall10", "heldout_recall10_reused", "heldout_recall10_shuffled"})
        ratio("textbook_recall10", a);
    benchmark::Shutdown();
    return 0;
}
