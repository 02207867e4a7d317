// examples/compare_simulation.cpp — how often do paired tests reject when two learners are
// equally good? The type-I error of the naive and the corrected resampled t (and of 5x2cv).
//
//   ./example_compare_simulation [replications=2000] [threads=2]
//
// Each replication draws a fresh data set of n rows: y = x1 + x2 + e with x1, x2, e iid
// standard normal. Learner A fits y ~ x1 by least squares, learner B fits y ~ x2: by symmetry
// both have the same expected error, so every rejection of "equal MSE" at alpha = 0.05 is a
// false one. Both learners are run on the same splits of each plan, recorded in two
// aggregators, and compared with heldout::compare. The table gives the share of replications
// whose two-sided p-value is below 0.05, with its Monte-Carlo standard error
// sqrt(r (1 - r) / R). Random numbers come from heldout::rng (normals by Box-Muller), one
// stream per replication, so the table is the same for any thread count and platform.
#include <heldout/compare.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/plan/five_by_two.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/subsampling.hpp>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <thread>
#include <vector>

namespace {

struct normals {
    heldout::rng g;
    bool has = false;
    double spare = 0;
    double operator()() {
        if (has) {
            has = false;
            return spare;
        }
        const double u1 = 1.0 - g.uniform(), u2 = g.uniform(); // u1 in (0, 1]
        const double r = std::sqrt(-2.0 * std::log(u1)), a = 6.283185307179586 * u2;
        spare = r * std::sin(a);
        has = true;
        return r * std::cos(a);
    }
};

struct data_set {
    std::vector<double> x1, x2, y;
};

data_set draw(std::size_t n, normals& z) {
    data_set d{std::vector<double>(n), std::vector<double>(n), std::vector<double>(n)};
    for (std::size_t i = 0; i < n; ++i) {
        d.x1[i] = z();
        d.x2[i] = z();
        d.y[i] = d.x1[i] + d.x2[i] + z();
    }
    return d;
}

// Least squares of y on one feature, fitted on the training rows, predicting the test rows.
auto one_feature_learner(const std::vector<double>& x, const std::vector<double>& y) {
    return [&x, &y](std::span<const std::size_t> train, std::span<const std::size_t> test) {
        double mx = 0, my = 0;
        for (std::size_t r : train) {
            mx += x[r];
            my += y[r];
        }
        mx /= static_cast<double>(train.size());
        my /= static_cast<double>(train.size());
        double sxy = 0, sxx = 0;
        for (std::size_t r : train) {
            sxy += (x[r] - mx) * (y[r] - my);
            sxx += (x[r] - mx) * (x[r] - mx);
        }
        const double b = sxy / sxx;
        std::vector<double> f;
        f.reserve(test.size());
        for (std::size_t r : test)
            f.push_back(my + b * (x[r] - mx));
        return f;
    };
}

struct setting {
    std::string plan;
    std::size_t n;
    int kind; // 0: repeated k-fold, 1: subsampling, 2: 5x2cv
    std::size_t folds, repeats;
    std::vector<heldout::paired::method> methods;
};

struct tally {
    std::vector<long> rejections;
    long undefined = 0;
};

template <class Plan>
void run_one(const Plan& plan, const data_set& d, const setting& s, tally& t) {
    const heldout::measure::mse mse{};
    const auto a = heldout::evaluate_splits(plan.splits(s.n), d.y, one_feature_learner(d.x1, d.y), mse);
    const auto b = heldout::evaluate_splits(plan.splits(s.n), d.y, one_feature_learner(d.x2, d.y), mse);
    for (std::size_t m = 0; m < s.methods.size(); ++m) {
        try {
            t.rejections[m] += heldout::compare(a, b, mse, s.methods[m], 0.95).p_value < 0.05 ? 1 : 0;
        } catch (const heldout::undefined_error&) {
            ++t.undefined;
        }
    }
}

tally run_setting(const setting& s, std::size_t index, long replications, unsigned threads) {
    std::vector<tally> parts(threads, tally{std::vector<long>(s.methods.size(), 0), 0});
    std::vector<std::thread> pool;
    for (unsigned w = 0; w < threads; ++w)
        pool.emplace_back([&, w] {
            for (long r = w; r < replications; r += threads) {
                const auto rep = static_cast<std::uint64_t>(r);
                normals z{heldout::rng(20261206 + index, rep)};
                const data_set d = draw(s.n, z);
                if (s.kind == 0)
                    run_one(heldout::repeated_kfold{.folds = s.folds, .repeats = s.repeats, .seed = rep}, d, s,
                            parts[w]);
                else if (s.kind == 1)
                    run_one(heldout::subsampling{.repeats = s.repeats, .test_fraction = 0.1, .seed = rep}, d, s,
                            parts[w]);
                else
                    run_one(heldout::five_by_two{.seed = rep}, d, s, parts[w]);
            }
        });
    for (auto& th : pool)
        th.join();
    tally all{std::vector<long>(s.methods.size(), 0), 0};
    for (const auto& p : parts) {
        for (std::size_t m = 0; m < s.methods.size(); ++m)
            all.rejections[m] += p.rejections[m];
        all.undefined += p.undefined;
    }
    return all;
}

} // namespace

int main(int argc, char** argv) {
    const long replications = argc > 1 ? std::atol(argv[1]) : 2000;
    const unsigned threads = argc > 2 ? static_cast<unsigned>(std::atoi(argv[2])) : 2u;
    if (replications < 2 || threads < 1) {
        std::fprintf(stderr, "usage: %s [replications >= 2] [threads >= 1]\n", argv[0]);
        return 2;
    }
    using namespace heldout;
    const std::vector<paired::method> t_pair{paired::naive_t, paired::corrected_t};
    const std::vector<setting> settings{
        {"10-fold CV", 100, 0, 10, 1, t_pair},
        {"10 x 10-fold CV", 100, 0, 10, 10, t_pair},
        {"10 x 10-fold CV", 500, 0, 10, 10, t_pair},
        {"subsampling 15 x (90% / 10%)", 100, 1, 0, 15, t_pair},
        {"5x2cv", 100, 2, 2, 5, {paired::five_by_two_t, paired::five_by_two_f}},
    };
    const auto start = std::chrono::steady_clock::now();
    std::printf("Two equally good learners, alpha = 0.05, %ld replications per row (Monte-Carlo SE in brackets)\n\n",
                replications);
    std::printf("| plan | n | test | rejection rate |\n|---|---:|---|---:|\n");
    for (std::size_t i = 0; i < settings.size(); ++i) {
        const auto& s = settings[i];
        const tally t = run_setting(s, i, replications, threads);
        for (std::size_t m = 0; m < s.methods.size(); ++m) {
            const double r = static_cast<double>(t.rejections[m]) / static_cast<double>(replications);
            const double se = std::sqrt(r * (1 - r) / static_cast<double>(replications));
            std::printf("| %s | %zu | %s | %.3f (%.3f) |\n", s.plan.c_str(), s.n,
                        std::string(paired::id_text(s.methods[m].id)).c_str(), r, se);
        }
        if (t.undefined > 0)
            std::printf("|   (%ld comparisons undefined and counted as not rejected) | | | |\n", t.undefined);
    }
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    std::printf("\n%.1f s on %u threads\n", secs, threads);
    return 0;
}
