// examples/tuning_trap.cpp — the tuning trap, shown (Varma & Simon 2006; Cawley & Talbot 2010).
//
// Data with no signal: 80 rows, 200 features uniform on [-1, 1], labels 0/1 drawn
// independently of the features, so every classifier's true error is exactly 0.5.
// 100 candidate settings: a nearest-centroid classifier on 100 random 5-feature subsets.
//  * naive: 10-fold CV error of every candidate on all rows, report the best one;
//  * nested: heldout::evaluate_tuned, the same choice made inside each outer training set
//    (5-fold inner CV), the chosen candidate refitted and scored on the outer fold.
// The naive figure is well below chance; the nested one sits at chance with an interval
// that covers it. Then the same over 100 such data sets. Invented data, fixed seeds: the
// output is the same on every platform (heldout::rng is specified bit for bit).
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/estimate/tuning.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/kfold.hpp>

#include <algorithm>
#include <cstdio>
#include <span>
#include <string>
#include <vector>

namespace {

constexpr std::size_t rows = 80, features = 200, candidates = 100, subset_size = 5;

struct data_set {
    std::vector<double> x; // rows x features, row-major
    std::vector<int> y;
    std::vector<std::vector<std::size_t>> subsets; // the feature subset of each candidate
};

data_set make_null_data(std::uint64_t seed) {
    heldout::rng g(seed);
    data_set d;
    for (std::size_t i = 0; i < rows * features; ++i)
        d.x.push_back(2.0 * g.uniform() - 1.0);
    for (std::size_t i = 0; i < rows; ++i)
        d.y.push_back(static_cast<int>(g.below(2))); // independent of x: no signal at all
    std::vector<std::size_t> all(features);
    for (std::size_t j = 0; j < features; ++j)
        all[j] = j;
    for (std::size_t c = 0; c < candidates; ++c) {
        heldout::shuffle(std::span<std::size_t>(all), g);
        d.subsets.emplace_back(all.begin(), all.begin() + subset_size);
    }
    return d;
}

// Candidate c: class centroids on its features from the train rows; each test row gets the
// class of the nearer centroid.
std::vector<int> nearest_centroid(const data_set& d, std::size_t c, std::span<const std::size_t> train,
                                  std::span<const std::size_t> test) {
    const auto& f = d.subsets[c];
    std::vector<double> centre[2] = {std::vector<double>(f.size()), std::vector<double>(f.size())};
    double count[2] = {0, 0};
    for (std::size_t r : train) {
        count[d.y[r]] += 1;
        for (std::size_t j = 0; j < f.size(); ++j)
            centre[d.y[r]][j] += d.x[r * features + f[j]];
    }
    for (int k = 0; k < 2; ++k)
        for (double& v : centre[k])
            v /= std::max(count[k], 1.0);
    std::vector<int> out;
    for (std::size_t r : test) {
        double dist[2] = {0, 0};
        for (int k = 0; k < 2; ++k)
            for (std::size_t j = 0; j < f.size(); ++j) {
                const double e = d.x[r * features + f[j]] - centre[k][j];
                dist[k] += e * e;
            }
        out.push_back(count[0] == 0 ? 1 : count[1] == 0 ? 0 : dist[1] < dist[0] ? 1 : 0);
    }
    return out;
}

struct naive_result {
    std::size_t best = 0;
    heldout::estimate estimate;
};

// What tuning reports when the choice is scored on the rows it was made on.
naive_result naive_best(const data_set& d, std::uint64_t seed) {
    const auto plan = heldout::kfold{.folds = 10, .seed = seed};
    naive_result out;
    for (std::size_t c = 0; c < candidates; ++c) {
        auto fit = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            return nearest_centroid(d, c, train, test);
        };
        const auto agg = heldout::evaluate_splits(plan.splits(heldout::strata(d.y)), d.y, fit,
                                                  heldout::measure::classification_error{});
        auto e = agg.estimate(heldout::measure::classification_error{});
        if (c == 0 || e.value < out.estimate.value) {
            out.best = c;
            out.estimate = std::move(e);
        }
    }
    return out;
}

heldout::tuned_result nested(const data_set& d, std::uint64_t seed, std::ostream* cost_stream) {
    auto fit = [&](std::size_t c, std::span<const std::size_t> train, std::span<const std::size_t> test) {
        return nearest_centroid(d, c, train, test);
    };
    return heldout::evaluate_tuned(heldout::kfold{.folds = 10, .seed = seed}.splits(heldout::strata(d.y)),
                                   heldout::kfold{.folds = 5, .seed = seed + 1}, candidates, d.y, fit,
                                   heldout::measure::classification_error{},
                                   {.threads = 2, .cost_stream = cost_stream});
}

bool covers(const heldout::estimate& e, double x) { return e.has_interval() && *e.lower <= x && x <= *e.upper; }

std::string interval(const heldout::estimate& e) {
    char buf[64];
    if (!e.has_interval())
        return "(none)";
    std::snprintf(buf, sizeof buf, "[%.3f, %.3f]", *e.lower, *e.upper);
    return buf;
}

} // namespace

int main() {
    std::printf("No signal: %zu rows, %zu features, labels independent of them (true error 0.5).\n", rows, features);
    std::printf("%zu candidates: nearest centroid on random %zu-feature subsets.\n\n", candidates, subset_size);

    const data_set d = make_null_data(1);
    const naive_result naive = naive_best(d, 1);
    std::fflush(stdout);
    const heldout::tuned_result r = nested(d, 1, &std::clog); // the cost line goes to std::clog

    std::printf("%-52s %6s  %s\n", "one data set", "error", "95% interval");
    std::printf("%-52s %6.3f  %s\n",
                ("naive: best of 100 by 10-fold CV (candidate " + std::to_string(naive.best) + ")").c_str(),
                naive.estimate.value, interval(naive.estimate).c_str());
    std::printf("%-52s %6.3f  %s\n", "nested: 10-fold outer, choice by 5-fold inner CV", r.outer.value,
                interval(r.outer).c_str());
    std::printf("%-52s %6.3f\n", "  best inner value (the naive figure inside)", r.inner_best);
    std::printf("%-52s %6.3f\n", "  optimism removed", r.optimism);
    std::printf("  selection: %zu distinct candidates in %zu outer folds; most chosen %zu (%zu of %zu)\n",
                r.distinct_chosen(), r.chosen.size(), r.most_chosen(), r.selection_counts[r.most_chosen()],
                r.chosen.size());
    std::printf("  cost: %s\n\n", heldout::describe(r.cost).c_str());

    constexpr std::size_t sets = 100;
    double naive_sum = 0, nested_sum = 0, optimism_sum = 0, distinct_sum = 0;
    double naive_lo = 1, naive_hi = 0, nested_lo = 1, nested_hi = 0;
    std::size_t naive_cover = 0, nested_cover = 0, naive_below = 0;
    for (std::uint64_t s = 1; s <= sets; ++s) {
        const data_set ds = s == 1 ? d : make_null_data(s);
        const naive_result nv = s == 1 ? naive : naive_best(ds, s);
        const heldout::tuned_result nr = s == 1 ? r : nested(ds, s, nullptr);
        naive_sum += nv.estimate.value;
        nested_sum += nr.outer.value;
        naive_lo = std::min(naive_lo, nv.estimate.value);
        naive_hi = std::max(naive_hi, nv.estimate.value);
        nested_lo = std::min(nested_lo, nr.outer.value);
        nested_hi = std::max(nested_hi, nr.outer.value);
        optimism_sum += nr.optimism;
        distinct_sum += static_cast<double>(nr.distinct_chosen());
        naive_cover += covers(nv.estimate, 0.5) ? 1 : 0;
        nested_cover += covers(nr.outer, 0.5) ? 1 : 0;
        naive_below += nv.estimate.value < 0.5 ? 1 : 0;
    }
    const double n = static_cast<double>(sets);
    std::printf("%-36s %6s  %-14s %s\n", "100 such data sets", "mean", "range", "95% interval covers 0.5");
    std::printf("%-36s %6.3f  %.3f..%.3f   %zu of %zu\n", "naive best of 100", naive_sum / n, naive_lo, naive_hi,
                naive_cover, sets);
    std::printf("%-36s %6.3f  %.3f..%.3f   %zu of %zu\n", "nested", nested_sum / n, nested_lo, nested_hi, nested_cover,
                sets);
    std::printf("  naive best below 0.5 in %zu of %zu; mean optimism removed %.3f;\n", naive_below, sets,
                optimism_sum / n);
    std::printf("  mean number of distinct candidates chosen in the 10 outer folds: %.1f\n", distinct_sum / n);
}
