// The validity study: how often does each interval method contain the true generalization
// error, for data-generating processes where that truth is computable?
//
//   ./example_coverage_study            # 2000 replications per row, 2 threads, seed 20261201
//   ./example_coverage_study 2000 4 7   # replications, threads, seed
//
// Processes (all data are simulated here):
//  * Linear: x ~ N(0, I_5), y = x'beta + e, e ~ N(0, 1), least squares without intercept.
//    - One holdout set (150 train, 50 test): the target is the error of the model actually
//      fitted, Err = E[(y - x'b)^2 | b] = 1 + |b - beta|^2 (x ~ N(0, I): closed form).
//    - k-fold / repeated k-fold / subsampling on n = 100: the target of the corrected
//      resampled t (Nadeau & Bengio 2003) is the expected error of the algorithm trained on
//      n_train rows, E|b - beta|^2 = p/(n_train - p - 1) (the inverse-Wishart mean), so
//      Err(n_train) = 1 + 5/(n_train - 6).
//  * Logistic: x uniform on the 21 points -2, -1.8, ..., 2; P(y = 1 | x) = 1/(1 + e^-(0.5 + 1.5x)).
//    A fixed classifier (predict 1 when x > 0) and a fixed score (x) are scored on one test
//    set of 100 rows; the true error rate and the true AUC are exact finite sums over the 21
//    points (AUC counts ties between equal x as 1/2).
// Each row: the share of replications whose interval contains the truth, its Monte-Carlo
// standard error sqrt(c (1 - c) / R), the mean interval width, and how many replications
// gave no interval (the method refused with undefined_error; left out of the share). Every interval goes
// through heldout::evaluate_splits / aggregator::estimate, so the dispatch is what is tested.
// The .632 / .632+ estimators are point estimates and have no interval to cover.
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/holdout.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/subsampling.hpp>

#include <Eigen/Dense>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <functional>
#include <random>
#include <string>
#include <thread>
#include <vector>

namespace {

namespace ci = heldout::ci;
constexpr int p = 5;
const double beta[p] = {1.0, -0.5, 0.25, 0.0, 2.0};

struct linear_data {
    Eigen::MatrixXd X;
    std::vector<double> y;
};

linear_data make_linear(std::size_t n, std::mt19937_64& g) {
    std::normal_distribution<double> d;
    linear_data D{Eigen::MatrixXd(static_cast<Eigen::Index>(n), p), std::vector<double>(n)};
    for (std::size_t i = 0; i < n; ++i) {
        double m = 0;
        for (int j = 0; j < p; ++j) {
            D.X(static_cast<Eigen::Index>(i), j) = d(g);
            m += beta[j] * D.X(static_cast<Eigen::Index>(i), j);
        }
        D.y[i] = m + d(g);
    }
    return D;
}

Eigen::VectorXd ols(const linear_data& D, std::span<const std::size_t> rows) {
    Eigen::MatrixXd A = Eigen::MatrixXd::Zero(p, p);
    Eigen::VectorXd b = Eigen::VectorXd::Zero(p);
    for (auto r : rows) {
        const auto x = D.X.row(static_cast<Eigen::Index>(r)).transpose();
        A.noalias() += x * x.transpose();
        b += x * D.y[r];
    }
    return A.ldlt().solve(b);
}

std::vector<double> ols_predict(const linear_data& D, std::span<const std::size_t> train,
                                std::span<const std::size_t> test) {
    const Eigen::VectorXd b = ols(D, train);
    std::vector<double> f;
    f.reserve(test.size());
    for (auto r : test)
        f.push_back(D.X.row(static_cast<Eigen::Index>(r)).dot(b));
    return f;
}

/// 1 + |b - beta|^2: the expected squared error of the fitted coefficients b on a new row.
double conditional_error(const Eigen::VectorXd& b) {
    double s = 1.0;
    for (int j = 0; j < p; ++j)
        s += (b(j) - beta[j]) * (b(j) - beta[j]);
    return s;
}

// ---- logistic process on a 21-point grid
constexpr int grid = 21;
double grid_x(int k) { return -2.0 + 0.2 * k; }
double prob1(double x) { return 1.0 / (1.0 + std::exp(-(0.5 + 1.5 * x))); }

double true_error() {
    double e = 0;
    for (int k = 0; k < grid; ++k) {
        const double x = grid_x(k), q = prob1(x);
        e += (x > 0 ? 1.0 - q : q) / grid;
    }
    return e;
}

double true_auc() {
    double p1 = 0, p0 = 0;
    for (int k = 0; k < grid; ++k) {
        p1 += prob1(grid_x(k)) / grid;
        p0 += (1 - prob1(grid_x(k))) / grid;
    }
    double a = 0;
    for (int i = 0; i < grid; ++i)
        for (int j = 0; j < grid; ++j) {
            const double w = (prob1(grid_x(i)) / grid / p1) * ((1 - prob1(grid_x(j))) / grid / p0);
            a += w * (i > j ? 1.0 : i == j ? 0.5 : 0.0);
        }
    return a;
}

struct row {
    std::string process, plan, measure, method;
    double level = 0.95;
    std::size_t hits = 0, runs = 0, undefined = 0;
    double width = 0;
};

struct cell {
    bool defined = true; // false: the method refused with undefined_error (no interval)
    bool covered = false;
    double width = 0;
};

// One replication fills one cell per table row.
using replication = std::function<void(std::uint64_t rep, std::vector<cell>& out)>;

struct study {
    std::vector<row> rows;
    std::vector<replication> parts;
    std::vector<std::size_t> first; // first row of each part
    void add(std::vector<row> r, replication f) {
        first.push_back(rows.size());
        rows.insert(rows.end(), r.begin(), r.end());
        parts.push_back(std::move(f));
    }
};

cell check(const heldout::estimate& e, double truth) {
    return {true, *e.lower <= truth && truth <= *e.upper, *e.upper - *e.lower};
}

} // namespace

int main(int argc, char** argv) {
    const std::size_t reps = argc > 1 ? std::strtoul(argv[1], nullptr, 10) : 2000;
    const unsigned threads = argc > 2 ? static_cast<unsigned>(std::strtoul(argv[2], nullptr, 10)) : 2;
    const std::uint64_t seed = argc > 3 ? std::strtoull(argv[3], nullptr, 10) : 20261201;
    const double level = 0.95;
    const auto mse = heldout::measure::mse{};
    study S;

    // Linear, one holdout set: t, percentile and BCa on the 50 squared errors.
    S.add({{"linear", "holdout 150/50", "MSE", "t"},
           {"linear", "holdout 150/50", "MSE", "bootstrap percentile"},
           {"linear", "holdout 150/50", "MSE", "BCa"}},
          [&](std::uint64_t rep, std::vector<cell>& out) {
              std::mt19937_64 g(seed ^ (0x100000000ULL + rep));
              const auto D = make_linear(200, g);
              double truth = 0;
              auto fit = [&](std::span<const std::size_t> tr, std::span<const std::size_t> te) {
                  truth = conditional_error(ols(D, tr));
                  return ols_predict(D, tr, te);
              };
              const auto agg =
                  heldout::evaluate_splits(heldout::holdout{.test_count = 50, .seed = rep}.splits(200), D.y, fit, mse);
              out.push_back(check(agg.estimate(mse, ci::t, level), truth));
              out.push_back(check(agg.estimate(mse, ci::bootstrap_percentile(1000, rep), level), truth));
              out.push_back(check(agg.estimate(mse, ci::bca(1000, rep), level), truth));
          });

    // Linear, resampling plans on n = 100: corrected t against the naive t.
    struct cvplan {
        std::string name;
        std::function<heldout::aggregator(const linear_data&, std::uint64_t)> run;
        double n_train;
    };
    const std::vector<cvplan> plans = {
        {"10-fold",
         [&](const linear_data& D, std::uint64_t s) {
             return heldout::evaluate_splits(
                 heldout::kfold{.folds = 10, .seed = s}.splits(100), D.y,
                 [&](auto tr, auto te) { return ols_predict(D, tr, te); }, mse);
         },
         90},
        {"10x10-fold",
         [&](const linear_data& D, std::uint64_t s) {
             return heldout::evaluate_splits(
                 heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = s}.splits(100), D.y,
                 [&](auto tr, auto te) { return ols_predict(D, tr, te); }, mse);
         },
         90},
        {"subsampling 15 x 90/10",
         [&](const linear_data& D, std::uint64_t s) {
             return heldout::evaluate_splits(
                 heldout::subsampling{.repeats = 15, .test_count = 10, .seed = s}.splits(100), D.y,
                 [&](auto tr, auto te) { return ols_predict(D, tr, te); }, mse);
         },
         90},
    };
    for (const auto& pl : plans) {
        S.add({{"linear", pl.name, "MSE", "corrected t"}, {"linear", pl.name, "MSE", "naive t"}},
              [&, pl](std::uint64_t rep, std::vector<cell>& out) {
                  std::mt19937_64 g(seed ^ (0x200000000ULL + rep));
                  const auto D = make_linear(100, g);
                  const double truth = 1.0 + p / (pl.n_train - p - 1.0); // E Err(n_train)
                  const auto agg = pl.run(D, rep);
                  out.push_back(check(agg.estimate(mse, ci::corrected_t, level), truth));
                  out.push_back(check(agg.estimate(mse, ci::naive_t, level), truth));
              });
    }

    // Logistic, fixed classifier and score on one test set of 100 rows.
    const double err_true = true_error(), auc_true = true_auc();
    S.add({{"logistic", "one test set, 100", "error rate", "Wilson"},
           {"logistic", "one test set, 100", "error rate", "Clopper-Pearson"},
           {"logistic", "one test set, 100", "error rate", "Agresti-Coull"},
           {"logistic", "one test set, 100", "error rate", "t"},
           {"logistic", "one test set, 100", "error rate", "BCa"},
           {"logistic", "one test set, 100", "AUC", "DeLong"},
           {"logistic", "one test set, 100", "AUC", "BCa"}},
          [&](std::uint64_t rep, std::vector<cell>& out) {
              std::mt19937_64 g(seed ^ (0x300000000ULL + rep));
              std::uniform_int_distribution<int> pick(0, grid - 1);
              std::uniform_real_distribution<double> u(0.0, 1.0);
              const std::size_t m = 100;
              std::vector<int> y(m), label(m);
              std::vector<double> score(m);
              std::vector<std::size_t> rows(m);
              for (std::size_t i = 0; i < m; ++i) {
                  const double x = grid_x(pick(g));
                  y[i] = u(g) < prob1(x) ? 1 : 0;
                  label[i] = x > 0 ? 1 : 0;
                  score[i] = x;
                  rows[i] = i;
              }
              const heldout::split s{{}, rows, 0, 0, 0, {}};
              heldout::aggregator err(heldout::measure::classification_error{});
              err.record(s, y, label);
              const auto ce = heldout::measure::classification_error{};
              out.push_back(check(err.estimate(ce, ci::wilson, level), err_true));
              out.push_back(check(err.estimate(ce, ci::clopper_pearson, level), err_true));
              out.push_back(check(err.estimate(ce, ci::agresti_coull, level), err_true));
              out.push_back(check(err.estimate(ce, ci::t, level), err_true));
              try {
                  out.push_back(check(err.estimate(ce, ci::bca(1000, rep), level), err_true));
              } catch (const heldout::undefined_error&) {
                  out.push_back({false, false, 0}); // no interval (e.g. every replicate on one side)
              }
              heldout::aggregator auc(heldout::measure::auc{});
              auc.record(s, y, score);
              out.push_back(check(auc.estimate(heldout::measure::auc{}, ci::delong, level), auc_true));
              out.push_back(check(auc.estimate(heldout::measure::auc{}, ci::bca(1000, rep), level), auc_true));
          });

    // Run: each worker takes every threads-th replication; cells land by replication number,
    // so the table is the same for any thread count.
    const auto t0 = std::chrono::steady_clock::now();
    std::vector<std::vector<cell>> cells(reps);
    std::vector<std::thread> pool;
    for (unsigned w = 0; w < threads; ++w)
        pool.emplace_back([&, w] {
            for (std::size_t r = w; r < reps; r += threads)
                for (const auto& part : S.parts)
                    part(r, cells[r]);
        });
    for (auto& t : pool)
        t.join();
    for (auto& r : S.rows)
        r.level = level;
    for (std::size_t r = 0; r < reps; ++r)
        for (std::size_t i = 0; i < S.rows.size(); ++i) {
            if (!cells[r][i].defined) {
                ++S.rows[i].undefined;
                continue;
            }
            S.rows[i].hits += cells[r][i].covered ? 1 : 0;
            S.rows[i].width += cells[r][i].width;
            ++S.rows[i].runs;
        }
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();

    std::printf("Coverage of nominal 95%% intervals, %zu replications per row (seed %llu):\n\n", reps,
                static_cast<unsigned long long>(seed));
    std::printf("| process | plan | measure | method | coverage | MC s.e. | mean width | no interval |\n");
    std::printf("|---|---|---|---|---:|---:|---:|---:|\n");
    for (const auto& r : S.rows) {
        const double c = static_cast<double>(r.hits) / static_cast<double>(r.runs);
        std::printf("| %s | %s | %s | %s | %.3f | %.3f | %.4f | %zu |\n", r.process.c_str(), r.plan.c_str(),
                    r.measure.c_str(), r.method.c_str(), c, std::sqrt(c * (1 - c) / static_cast<double>(r.runs)),
                    r.width / static_cast<double>(r.runs), r.undefined);
    }
    std::printf("\nTruths: linear holdout 1 + |b - beta|^2 of the fitted b; linear resampling "
                "1 + 5/(n_train - 6) = %.6f; logistic error rate %.6f, AUC %.6f.\n",
                1.0 + 5.0 / 84.0, err_true, auc_true);
    std::printf("(%.1f s on %u threads)\n", secs, threads);
    return 0;
}
