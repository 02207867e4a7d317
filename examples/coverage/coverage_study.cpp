// The coverage study: how often does each interval contain the true generalization error,
// and how often does each comparison test reject a true null, on simulated processes where
// the truth is known? The tables of docs/intervals.md and the coverage claims of README.md
// come from this program's full run; a reduced run is a ctest (examples.coverage_study) that
// checks every row against the recorded full-run rate within a band of its own Monte-Carlo
// error, so the study cannot rot and a change that moves a coverage fails.
//
//   example_coverage_study --record examples/coverage   # THE full run (2000 replications, 2
//        # threads, seed 20261201), from the source directory; writes coverage_recorded.inc and
//        # coverage_full_run.md there and the same tables into docs/intervals.md (between markers)
//   example_coverage_study --quick                # 300 replications, checked against coverage_recorded.inc
//   example_coverage_study 500 2 7                # replications, threads, seed (prints the tables only)
//
// Replication r draws its data and its plan seeds from (seed, r) alone, so the quick run is
// the first 300 replications of the full run and any thread count gives the same table.
// Processes (all data simulated here; Gaussian designs x ~ N(0, I_d), noise N(0, 1)):
//  * Least squares without intercept on the correct model y = x'beta + e. For x ~ N(0, I) the
//    error of fitted coefficients b is Err(b) = 1 + |b - beta|^2 (the fitted model's error,
//    Err_XY), and over training sets of size m its mean is E Err(m) = 1 + p/(m - p - 1) (the
//    inverse-Wishart mean): the estimand of the corrected resampled t (Nadeau & Bengio 2003).
//    Stable: p = 5 with n = 100 and n = 500. Unstable: p = 20 with n = 50 (p/n = 0.4).
//  * Classifiers on x ~ N(0, I_2), P(y = 1 | x) = logistic(a + w'x): 1-nearest neighbour
//    (unstable), logistic regression with intercept (stable), discrete AdaBoost of 100 stumps
//    (unstable); balanced (w = (2, 0), a = 0) and 5 % positives (w = (1, 1), a = -3.75).
//    E Err(n_train) by Monte Carlo (2000 training sets x 500 test points, the conditional
//    error exact at each point), its MC error printed.
//  * Comparison tests under a true null: two learners that are equally good by symmetry
//    (least squares, 1-NN, logistic regression or stumps on (x1, x3) against (x2, x4), y
//    symmetric in x1 and x2; least squares on features 1-20 against 21-40 of 40 equal ones),
//    on 10 x 10-fold CV and on 5x2cv. Null = equal expected error.
//  * AUC: a fixed score, positives N(delta, 1), negatives N(0, 1): AUC = Phi(delta/sqrt 2);
//    paired tests: two scores x + e_A, x + e_B with equal noise, so equal AUCs.
//  * Nested CV (Bates, Hastie & Tibshirani 2023): least squares (stable and unstable) and
//    1-nearest neighbour (0-1 loss), 10 folds, 50 repetitions; coverage of Err_XY (the model
//    fitted on all n rows) and of E Err(n).
//  * One test set (fixed rules): a logistic process on a 21-point grid (exact truths), balanced
//    and with 5 % positives; McNemar and the paired bootstrap on two fixed rules equally good
//    by symmetry.
// Every interval and test goes through heldout's public entry points (evaluate_splits,
// aggregator::estimate, compare, nested_cv_interval), so the dispatch is what is measured.
// "no interval": the method refused with undefined_error (e.g. DeLong at AUC = 1); the rate
// is over the replications that gave one, and the "miss" column counts them as misses.
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/estimate/nested_cv.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/loss/zero_one.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/five_by_two.hpp>
#include <heldout/plan/holdout.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/subsampling.hpp>

#include <Eigen/Dense>
#include <boost/math/distributions/normal.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <functional>
#include <map>
#include <random>
#include <string>
#include <thread>
#include <vector>

namespace {

namespace ci = heldout::ci;
namespace paired = heldout::paired;
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
/// P(y = 1 | x) on the grid: logistic(a + 1.5 x); a = 0.5 balanced (48 % positives), a = -4.1
/// imbalanced (5 % positives).
double prob_at(double a, double x) { return 1.0 / (1.0 + std::exp(-(a + 1.5 * x))); }
double prob1(double x) { return prob_at(0.5, x); }

/// Exact error rate of the rule "predict 1 when x > cut" on the grid process with intercept a.
double true_error(double a = 0.5, double cut = 0.0) {
    double e = 0;
    for (int k = 0; k < grid; ++k) {
        const double x = grid_x(k), q = prob_at(a, x);
        e += (x > cut ? 1.0 - q : q) / grid;
    }
    return e;
}

/// Exact AUC of the score x on the grid process with intercept a (ties count 1/2).
double true_auc(double a = 0.5) {
    double p1 = 0, p0 = 0;
    for (int k = 0; k < grid; ++k) {
        p1 += prob_at(a, grid_x(k)) / grid;
        p0 += (1 - prob_at(a, grid_x(k))) / grid;
    }
    double r = 0;
    for (int i = 0; i < grid; ++i)
        for (int j = 0; j < grid; ++j) {
            const double w = (prob_at(a, grid_x(i)) / grid / p1) * ((1 - prob_at(a, grid_x(j))) / grid / p0);
            r += w * (i > j ? 1.0 : i == j ? 0.5 : 0.0);
        }
    return r;
}

// ---- Gaussian designs with any number of features, least squares and 1-NN on chosen columns
struct gauss_data {
    Eigen::MatrixXd X;
    std::vector<double> y;    // regression response
    std::vector<int> label;   // classification label
    std::vector<double> prob; // P(y = 1 | x) for classification
};

gauss_data make_regression(std::size_t n, const std::vector<double>& b, std::mt19937_64& g) {
    std::normal_distribution<double> d;
    const auto k = static_cast<Eigen::Index>(b.size());
    gauss_data D{Eigen::MatrixXd(static_cast<Eigen::Index>(n), k), std::vector<double>(n), {}, {}};
    for (std::size_t i = 0; i < n; ++i) {
        double m = 0;
        for (Eigen::Index j = 0; j < k; ++j) {
            D.X(static_cast<Eigen::Index>(i), j) = d(g);
            m += b[static_cast<std::size_t>(j)] * D.X(static_cast<Eigen::Index>(i), j);
        }
        D.y[i] = m + d(g);
    }
    return D;
}

double logistic(double t) { return 1.0 / (1.0 + std::exp(-t)); }

/// P(y = 1 | x) = logistic(a + w'x), x ~ N(0, I).
gauss_data make_classes(std::size_t n, const std::vector<double>& w, std::mt19937_64& g, double a = 0.0) {
    std::normal_distribution<double> d;
    std::uniform_real_distribution<double> u(0.0, 1.0);
    const auto k = static_cast<Eigen::Index>(w.size());
    gauss_data D{Eigen::MatrixXd(static_cast<Eigen::Index>(n), k), std::vector<double>(n), std::vector<int>(n),
                 std::vector<double>(n)};
    for (std::size_t i = 0; i < n; ++i) {
        double t = a;
        for (Eigen::Index j = 0; j < k; ++j) {
            D.X(static_cast<Eigen::Index>(i), j) = d(g);
            t += w[static_cast<std::size_t>(j)] * D.X(static_cast<Eigen::Index>(i), j);
        }
        D.prob[i] = logistic(t);
        D.label[i] = u(g) < D.prob[i] ? 1 : 0;
        D.y[i] = D.label[i];
    }
    return D;
}

Eigen::VectorXd ols_on(const gauss_data& D, std::span<const std::size_t> rows, const std::vector<int>& cols) {
    const auto k = static_cast<Eigen::Index>(cols.size());
    Eigen::MatrixXd A = Eigen::MatrixXd::Zero(k, k);
    Eigen::VectorXd b = Eigen::VectorXd::Zero(k);
    Eigen::VectorXd x(k);
    for (auto r : rows) {
        for (Eigen::Index j = 0; j < k; ++j)
            x(j) = D.X(static_cast<Eigen::Index>(r), cols[static_cast<std::size_t>(j)]);
        A.noalias() += x * x.transpose();
        b += x * D.y[r];
    }
    return A.ldlt().solve(b);
}

std::vector<double> ols_predict_on(const gauss_data& D, std::span<const std::size_t> train,
                                   std::span<const std::size_t> test, const std::vector<int>& cols) {
    const Eigen::VectorXd b = ols_on(D, train, cols);
    std::vector<double> f;
    f.reserve(test.size());
    for (auto r : test) {
        double s = 0;
        for (std::size_t j = 0; j < cols.size(); ++j)
            s += b(static_cast<Eigen::Index>(j)) * D.X(static_cast<Eigen::Index>(r), cols[j]);
        f.push_back(s);
    }
    return f;
}

/// 1 + |b - beta|^2 for coefficients b on all columns (x ~ N(0, I), noise variance 1).
double fitted_error(const Eigen::VectorXd& b, const std::vector<double>& beta_) {
    double s = 1.0;
    for (std::size_t j = 0; j < beta_.size(); ++j)
        s += (b(static_cast<Eigen::Index>(j)) - beta_[j]) * (b(static_cast<Eigen::Index>(j)) - beta_[j]);
    return s;
}

std::vector<int> all_columns(std::size_t k) {
    std::vector<int> c(k);
    for (std::size_t j = 0; j < k; ++j)
        c[j] = static_cast<int>(j);
    return c;
}

/// Label of the nearest training row (Euclidean on cols); ties to the first.
int nn1(const gauss_data& D, std::span<const std::size_t> train, const double* x, const std::vector<int>& cols,
        const gauss_data* from = nullptr) {
    const gauss_data& T = from ? *from : D;
    double best = 1e300;
    int lab = 0;
    for (auto r : train) {
        double d2 = 0;
        for (std::size_t j = 0; j < cols.size(); ++j) {
            const double t = T.X(static_cast<Eigen::Index>(r), cols[j]) - x[j];
            d2 += t * t;
        }
        if (d2 < best) {
            best = d2;
            lab = T.label[r];
        }
    }
    return lab;
}

// ---- classifiers as learners: fit on training rows and columns, return a rule on a point
/// A fitted classifier: the label of a point, given all features of the process.
using rule = std::function<int(const double*)>;
/// A learner: fits a rule on the training rows of D, using the columns cols.
using learner = std::function<rule(const gauss_data&, std::span<const std::size_t>, const std::vector<int>&)>;

rule nn1_fit(const gauss_data& D, std::span<const std::size_t> train, const std::vector<int>& cols) {
    return [&D, tr = std::vector<std::size_t>(train.begin(), train.end()), cols](const double* x) {
        std::vector<double> xc(cols.size());
        for (std::size_t j = 0; j < cols.size(); ++j)
            xc[j] = x[cols[j]];
        return nn1(D, tr, xc.data(), cols);
    };
}

/// Logistic regression with an intercept, Newton-Raphson from zero (at most 30 steps); a ridge
/// of 1e-3 on the slopes keeps a separable training set finite (the rule is sign(b'x)).
rule logit_fit(const gauss_data& D, std::span<const std::size_t> train, const std::vector<int>& cols) {
    const auto k = static_cast<Eigen::Index>(cols.size()) + 1;
    Eigen::VectorXd b = Eigen::VectorXd::Zero(k), x(k), grad(k);
    Eigen::MatrixXd H(k, k);
    for (int it = 0; it < 30; ++it) {
        grad.setZero();
        H.setZero();
        for (auto r : train) {
            x(0) = 1;
            for (Eigen::Index j = 1; j < k; ++j)
                x(j) = D.X(static_cast<Eigen::Index>(r), cols[static_cast<std::size_t>(j - 1)]);
            const double q = logistic(x.dot(b));
            grad += x * (D.label[r] - q);
            H.noalias() += (q * (1 - q)) * x * x.transpose();
        }
        for (Eigen::Index j = 1; j < k; ++j) {
            H(j, j) += 1e-3;
            grad(j) -= 1e-3 * b(j);
        }
        const Eigen::VectorXd step = H.ldlt().solve(grad);
        b += step;
        if (step.cwiseAbs().maxCoeff() < 1e-9)
            break;
    }
    return [b, cols](const double* xf) {
        double t = b(0);
        for (std::size_t j = 0; j < cols.size(); ++j)
            t += b(static_cast<Eigen::Index>(j) + 1) * xf[cols[j]];
        return t > 0 ? 1 : 0;
    };
}

/// Discrete AdaBoost (Freund & Schapire 1997) of 100 decision stumps: each round the stump
/// (column, cut between distinct training values, sign) of least weighted error.
rule stumps_fit(const gauss_data& D, std::span<const std::size_t> train, const std::vector<int>& cols) {
    struct stump {
        int col;
        double cut, vote; // vote = +-alpha: added when x[col] > cut, subtracted otherwise
    };
    const std::size_t n = train.size();
    std::vector<double> w(n, 1.0 / static_cast<double>(n)), y(n);
    for (std::size_t i = 0; i < n; ++i)
        y[i] = D.label[train[i]] == 1 ? 1.0 : -1.0;
    auto value = [&](std::size_t i, int c) { return D.X(static_cast<Eigen::Index>(train[i]), c); };
    std::vector<std::vector<std::size_t>> order(cols.size(), std::vector<std::size_t>(n));
    for (std::size_t j = 0; j < cols.size(); ++j) {
        for (std::size_t i = 0; i < n; ++i)
            order[j][i] = i;
        std::sort(order[j].begin(), order[j].end(),
                  [&](std::size_t u, std::size_t v) { return value(u, cols[j]) < value(v, cols[j]); });
    }
    std::vector<stump> model;
    for (int m = 0; m < 100; ++m) {
        double best = 2, cut = 0, sign = 1;
        int col = cols[0];
        for (std::size_t j = 0; j < cols.size(); ++j) {
            // Rows at or below the cut get -sign, above it +sign; e = weighted error of sign +1.
            double e = 0;
            for (std::size_t i = 0; i < n; ++i)
                e += y[i] < 0 ? w[i] : 0.0;
            for (std::size_t t = 0; t <= n; ++t) {
                if (t > 0) {
                    const std::size_t i = order[j][t - 1];
                    e += y[i] > 0 ? w[i] : -w[i];
                    if (t < n && value(order[j][t], cols[j]) == value(i, cols[j]))
                        continue; // no cut between equal values
                }
                const double c = t == 0   ? -1e300
                                 : t == n ? 1e300
                                          : 0.5 * (value(order[j][t - 1], cols[j]) + value(order[j][t], cols[j]));
                if (e < best) {
                    best = e, cut = c, sign = 1, col = cols[j];
                }
                if (1 - e < best) {
                    best = 1 - e, cut = c, sign = -1, col = cols[j];
                }
            }
        }
        const double eps = std::max(best, 1e-10);
        if (eps >= 0.5)
            break;
        const double alpha = 0.5 * std::log((1 - eps) / eps);
        model.push_back({col, cut, sign * alpha});
        double total = 0;
        for (std::size_t i = 0; i < n; ++i) {
            const double h = value(i, col) > cut ? sign : -sign;
            w[i] *= std::exp(-alpha * y[i] * h);
            total += w[i];
        }
        for (auto& v : w)
            v /= total;
    }
    return [model](const double* x) {
        double f = 0;
        for (const auto& s : model)
            f += x[s.col] > s.cut ? s.vote : -s.vote;
        return f > 0 ? 1 : 0;
    };
}

/// The labels a learner fitted on train gives the test rows of D.
std::vector<int> classify(const learner& fit, const gauss_data& D, std::span<const std::size_t> train,
                          std::span<const std::size_t> test, const std::vector<int>& cols) {
    const rule r = fit(D, train, cols);
    std::vector<int> f;
    f.reserve(test.size());
    std::vector<double> x(static_cast<std::size_t>(D.X.cols()));
    for (auto i : test) {
        for (std::size_t j = 0; j < x.size(); ++j)
            x[j] = D.X(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j));
        f.push_back(r(x.data()));
    }
    return f;
}

/// E Err(m) of a learner on process (w, a) by Monte Carlo: sets training sets of m rows, each
/// scored exactly (conditional error) at tests fresh points. Returns mean and its MC s.e.
std::pair<double, double> expected_error(const learner& fit, std::size_t m, const std::vector<double>& w, double a,
                                         std::size_t sets, std::size_t tests, std::uint64_t seed) {
    std::mt19937_64 g(seed);
    std::normal_distribution<double> d;
    const auto cols = all_columns(w.size());
    std::vector<std::size_t> train(m);
    for (std::size_t i = 0; i < m; ++i)
        train[i] = i;
    double s = 0, s2 = 0;
    std::vector<double> x(w.size());
    for (std::size_t k = 0; k < sets; ++k) {
        const auto D = make_classes(m, w, g, a);
        const rule r = fit(D, train, cols);
        double e = 0;
        for (std::size_t t = 0; t < tests; ++t) {
            double z = a;
            for (std::size_t j = 0; j < w.size(); ++j) {
                x[j] = d(g);
                z += w[j] * x[j];
            }
            const double q = logistic(z);
            e += r(x.data()) == 1 ? 1 - q : q;
        }
        e /= static_cast<double>(tests);
        s += e;
        s2 += e * e;
    }
    const double k = static_cast<double>(sets), mean = s / k;
    return {mean, std::sqrt((s2 / k - mean * mean) / (k - 1))};
}

// ---- the study's bookkeeping
struct row {
    std::string section, process, plan, method, target;
    std::size_t hits = 0, runs = 0, undefined = 0;
    double width = 0;
    std::size_t reps = 0; // replications this row ran
};

struct cell {
    bool defined = true; // false: the method refused with undefined_error (no interval)
    bool hit = false;    // covered the truth / rejected the null
    double width = 0;
};

using replication = std::function<void(std::uint64_t rep, std::vector<cell>& out)>;

struct study {
    std::vector<row> rows;
    std::vector<replication> parts;
    std::vector<std::size_t> first;   // first row of each part
    std::vector<std::size_t> max_rep; // a part runs replications 0 .. max_rep - 1
    void add(std::vector<row> r, replication f, std::size_t reps) {
        first.push_back(rows.size());
        rows.insert(rows.end(), r.begin(), r.end());
        parts.push_back(std::move(f));
        max_rep.push_back(reps);
    }
};

cell check(const heldout::estimate& e, double truth) {
    return {true, *e.lower <= truth && truth <= *e.upper, *e.upper - *e.lower};
}

template <class F>
cell guarded(F&& f) {
    try {
        return f();
    } catch (const heldout::undefined_error&) {
        return {false, false, 0};
    }
}

cell rejects(const heldout::comparison& c) { return {true, c.p_value < 0.05, 0}; }

std::string key_of(const row& r) {
    return r.section + " | " + r.process + " | " + r.plan + " | " + r.method + " | " + r.target;
}

// The full run's rates, recorded with --expected (2000 replications, seed 20261201); the
// quick run checks each of its rows against them.
struct recorded {
    const char* key;
    double rate;
};
const std::vector<recorded> full_run = {
#include "coverage_recorded.inc"
};

} // namespace

int main(int argc, char** argv) {
    bool quick = false;
    const char* record_dir = nullptr; // --record DIR: write the recorded rates and the tables there
    std::vector<const char*> nums;
    for (int i = 1; i < argc; ++i) {
        if (std::strcmp(argv[i], "--quick") == 0)
            quick = true;
        else if (std::strcmp(argv[i], "--record") == 0 && i + 1 < argc)
            record_dir = argv[++i];
        else
            nums.push_back(argv[i]);
    }
    const std::size_t reps = nums.size() > 0 ? std::strtoul(nums[0], nullptr, 10) : quick ? 300 : 2000;
    const unsigned threads = nums.size() > 1 ? static_cast<unsigned>(std::strtoul(nums[1], nullptr, 10)) : 2;
    const std::uint64_t seed = nums.size() > 2 ? std::strtoull(nums[2], nullptr, 10) : 20261201;
    const double level = 0.95;
    const auto mse = heldout::measure::mse{};
    const auto cerr = heldout::measure::classification_error{};
    const auto auc = heldout::measure::auc{};
    study S;
    const std::size_t all = reps;

    // ---- 1. error intervals over resampling plans: stable and unstable learners
    const std::string sec1 = "error interval, resampling";
    // Linear p = 5, one holdout set: t, percentile and BCa on the 50 squared errors.
    S.add(
        {{sec1, "least squares p=5", "holdout 150/50", "t", "Err of fitted model"},
         {sec1, "least squares p=5", "holdout 150/50", "bootstrap percentile", "Err of fitted model"},
         {sec1, "least squares p=5", "holdout 150/50", "BCa", "Err of fitted model"}},
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
        },
        all);
    // Least squares on three designs, corrected t against naive t.
    struct lsq_case {
        std::string name;
        std::size_t n, p;
        std::uint64_t salt;
    };
    const std::vector<lsq_case> lsq = {{"least squares p=5, n=100 (stable)", 100, 5, 0x200000000ULL},
                                       {"least squares p=5, n=500 (stable)", 500, 5, 0x210000000ULL},
                                       {"least squares p=20, n=50 (unstable)", 50, 20, 0x220000000ULL}};
    for (const auto& c : lsq) {
        std::vector<double> b(c.p);
        for (std::size_t j = 0; j < c.p; ++j)
            b[j] = j % 2 == 0 ? 1.0 : -0.5;
        const auto cols = all_columns(c.p);
        const double n_train = static_cast<double>(c.n) * 0.9;
        const double truth = 1.0 + static_cast<double>(c.p) / (n_train - static_cast<double>(c.p) - 1.0);
        std::vector<row> rs;
        for (const char* plan : {"10-fold", "10x10-fold", "subsampling 15 x 90/10"})
            for (const char* m : {"corrected t", "naive t"})
                rs.push_back({sec1, c.name, plan, m, "E Err(n_train)"});
        S.add(
            rs,
            [&, c, b, cols, truth](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (c.salt + rep));
                const auto D = make_regression(c.n, b, g);
                auto fit = [&](auto tr, auto te) { return ols_predict_on(D, tr, te, cols); };
                const auto a1 =
                    heldout::evaluate_splits(heldout::kfold{.folds = 10, .seed = rep}.splits(c.n), D.y, fit, mse);
                const auto a2 = heldout::evaluate_splits(
                    heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = rep}.splits(c.n), D.y, fit, mse);
                const auto a3 = heldout::evaluate_splits(
                    heldout::subsampling{.repeats = 15, .test_count = c.n / 10, .seed = rep}.splits(c.n), D.y, fit,
                    mse);
                for (const auto* a : {&a1, &a2, &a3}) {
                    out.push_back(check(a->estimate(mse, ci::corrected_t, level), truth));
                    out.push_back(check(a->estimate(mse, ci::naive_t, level), truth));
                }
            },
            all);
    }
    // Classifiers on x ~ N(0, I_2): the truth E Err(n_train) by Monte Carlo (2000 training
    // sets x 500 test points, conditional error exact at each point; its MC s.e. is printed).
    struct class_case {
        std::string name;
        std::size_t n;
        std::vector<double> w;
        double a;
        learner fit;
        std::uint64_t salt;
    };
    const std::vector<double> w_nn{2.0, 0.0}, w_rare{1.0, 1.0};
    const double a_rare = -3.75; // about 5 % positives (numpy: mean logistic(a + z1 + z2) = 0.05 at a = -3.756)
    const std::vector<class_case> classes = {
        {"1-nearest neighbour, n=100 (unstable)", 100, w_nn, 0.0, nn1_fit, 0x230000000ULL},
        {"logistic regression, n=100 (stable)", 100, w_nn, 0.0, logit_fit, 0x240000000ULL},
        {"boosted stumps (100 rounds), n=100 (unstable)", 100, w_nn, 0.0, stumps_fit, 0x250000000ULL},
        {"logistic regression, 5% positives, n=200", 200, w_rare, a_rare, logit_fit, 0x260000000ULL},
        {"1-nearest neighbour, 5% positives, n=200 (unstable)", 200, w_rare, a_rare, nn1_fit, 0x270000000ULL}};
    std::vector<std::pair<double, double>> class_truth;
    for (const auto& c : classes)
        class_truth.push_back(expected_error(c.fit, c.n * 9 / 10, c.w, c.a, 2000, 500, seed ^ 0x5A5A5A5AULL ^ c.salt));
    for (std::size_t k = 0; k < classes.size(); ++k) {
        const auto& c = classes[k];
        const double truth = class_truth[k].first;
        S.add(
            {{sec1, c.name, "10x10-fold", "corrected t", "E Err(n_train)"},
             {sec1, c.name, "10x10-fold", "naive t", "E Err(n_train)"}},
            [&, c, truth](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (c.salt + rep));
                const auto D = make_classes(c.n, c.w, g, c.a);
                const auto cols = all_columns(c.w.size());
                const auto a = heldout::evaluate_splits(
                    heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = rep}.splits(c.n), D.label,
                    [&](auto tr, auto te) { return classify(c.fit, D, tr, te, cols); }, cerr);
                out.push_back(guarded([&] { return check(a.estimate(cerr, ci::corrected_t, level), truth); }));
                out.push_back(guarded([&] { return check(a.estimate(cerr, ci::naive_t, level), truth); }));
            },
            all);
    }

    // ---- 2. comparison tests under a true null, 10 x 10-fold CV
    const std::string sec2 = "comparison test, true null";
    struct null_case {
        std::string name;
        std::size_t n;
        learner fit; // empty: least squares on D.y
        std::vector<double> coef;
        std::vector<int> cols_a, cols_b;
        std::uint64_t salt;
    };
    std::vector<int> first20(20), second20(20);
    for (int j = 0; j < 20; ++j) {
        first20[static_cast<std::size_t>(j)] = j;
        second20[static_cast<std::size_t>(j)] = 20 + j;
    }
    const std::vector<double> sym{1.5, 1.5, 0.0, 0.0};
    const std::vector<null_case> nulls = {
        {"least squares on 2 of 4 features, n=100 (stable)",
         100,
         {},
         {1.0, 1.0, 0.0, 0.0},
         {0, 2},
         {1, 3},
         0x600000000ULL},
        {"least squares on 20 of 40 features, n=50 (unstable)",
         50,
         {},
         std::vector<double>(40, 0.3),
         first20,
         second20,
         0x610000000ULL},
        {"1-nearest neighbour on 2 of 4 features, n=100 (unstable)", 100, nn1_fit, sym, {0, 2}, {1, 3}, 0x620000000ULL},
        {"logistic regression on 2 of 4 features, n=100 (stable)", 100, logit_fit, sym, {0, 2}, {1, 3}, 0x630000000ULL},
        {"boosted stumps on 2 of 4 features, n=100 (unstable)", 100, stumps_fit, sym, {0, 2}, {1, 3}, 0x640000000ULL}};
    for (const auto& c : nulls) {
        S.add(
            {{sec2, c.name, "10x10-fold", "corrected t", "rejects at 5%"},
             {sec2, c.name, "10x10-fold", "naive t", "rejects at 5%"},
             {sec2, c.name, "5x2-fold", "5x2cv t", "rejects at 5%"},
             {sec2, c.name, "5x2-fold", "5x2cv F", "rejects at 5%"}},
            [&, c](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (c.salt + rep));
                const auto D = c.fit ? make_classes(c.n, c.coef, g) : make_regression(c.n, c.coef, g);
                // Both models on the same splits of a plan; the comparison by the given method.
                auto test = [&](const auto& plan, paired::method how) {
                    if (c.fit) {
                        const auto a = heldout::evaluate_splits(
                            plan.splits(c.n), D.label,
                            [&](auto tr, auto te) { return classify(c.fit, D, tr, te, c.cols_a); }, cerr);
                        const auto b = heldout::evaluate_splits(
                            plan.splits(c.n), D.label,
                            [&](auto tr, auto te) { return classify(c.fit, D, tr, te, c.cols_b); }, cerr);
                        return heldout::compare(a, b, cerr, how);
                    }
                    const auto a = heldout::evaluate_splits(
                        plan.splits(c.n), D.y, [&](auto tr, auto te) { return ols_predict_on(D, tr, te, c.cols_a); },
                        mse);
                    const auto b = heldout::evaluate_splits(
                        plan.splits(c.n), D.y, [&](auto tr, auto te) { return ols_predict_on(D, tr, te, c.cols_b); },
                        mse);
                    return heldout::compare(a, b, mse, how);
                };
                const auto rk = heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = rep};
                const auto f2 = heldout::five_by_two{.seed = rep};
                out.push_back(guarded([&] { return rejects(test(rk, paired::corrected_t)); }));
                out.push_back(guarded([&] { return rejects(test(rk, paired::naive_t)); }));
                out.push_back(guarded([&] { return rejects(test(f2, paired::five_by_two_t)); }));
                out.push_back(guarded([&] { return rejects(test(f2, paired::five_by_two_f)); }));
            },
            all);
    }

    // ---- 3. AUC intervals with few positives or negatives (one test set, fixed score)
    const std::string sec3 = "AUC interval, small classes";
    struct auc_case {
        std::size_t pos, neg;
        double auc;
    };
    const std::vector<auc_case> aucs = {{5, 5, 0.9},     {10, 10, 0.9},  {5, 95, 0.9},    {10, 200, 0.9},
                                        {20, 200, 0.9},  {30, 200, 0.9}, {100, 100, 0.9}, {5, 95, 0.75},
                                        {10, 200, 0.75}, {30, 200, 0.75}};
    for (std::size_t k = 0; k < aucs.size(); ++k) {
        const auto c = aucs[k];
        const std::string proc = "binormal AUC " + std::to_string(c.auc).substr(0, 4);
        const std::string plan = std::to_string(c.pos) + " positives, " + std::to_string(c.neg) + " negatives";
        const double delta = std::sqrt(2.0) * boost::math::quantile(boost::math::normal(), c.auc);
        S.add(
            {{sec3, proc, plan, "DeLong (logit)", "AUC"}, {sec3, proc, plan, "Newcombe score", "AUC"}},
            [&, c, delta, k](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (0x400000000ULL + (k << 24) + rep));
                std::normal_distribution<double> d;
                std::vector<int> y;
                std::vector<double> s;
                std::vector<std::size_t> rows;
                for (std::size_t i = 0; i < c.pos + c.neg; ++i) {
                    y.push_back(i < c.pos ? 1 : 0);
                    s.push_back(d(g) + (i < c.pos ? delta : 0.0));
                    rows.push_back(i);
                }
                heldout::aggregator a(auc);
                a.record(heldout::split{{}, rows, 0, 0, 0, {}}, y, s);
                out.push_back(guarded([&] { return check(a.estimate(auc, ci::delong, level), c.auc); }));
                out.push_back(guarded([&] { return check(a.estimate(auc, ci::newcombe, level), c.auc); }));
            },
            all);
    }
    // Paired DeLong test, two equally good scores.
    const std::vector<auc_case> pairs = {{5, 95, 0.85}, {10, 200, 0.85}, {30, 200, 0.85}, {100, 100, 0.85}};
    for (std::size_t k = 0; k < pairs.size(); ++k) {
        const auto c = pairs[k];
        const std::string plan = std::to_string(c.pos) + " positives, " + std::to_string(c.neg) + " negatives";
        const double delta = std::sqrt(2.0) * boost::math::quantile(boost::math::normal(), c.auc);
        S.add(
            {{sec3, "two equal binormal scores", plan, "paired DeLong", "rejects at 5%"}},
            [&, c, delta, k](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (0x500000000ULL + (k << 24) + rep));
                std::normal_distribution<double> d;
                std::vector<int> y;
                std::vector<double> sa, sb;
                for (std::size_t i = 0; i < c.pos + c.neg; ++i) {
                    const double x = d(g) + (i < c.pos ? delta : 0.0);
                    y.push_back(i < c.pos ? 1 : 0);
                    sa.push_back(x + 0.7 * d(g));
                    sb.push_back(x + 0.7 * d(g));
                }
                out.push_back(guarded([&] { return rejects(heldout::compare(auc, y, sa, sb, paired::delong)); }));
            },
            all);
    }

    // ---- 4. nested cross-validation (Bates, Hastie & Tibshirani 2023), 10 folds x 50 repetitions
    const std::string sec4 = "nested CV interval";
    for (const auto& c : {lsq[0], lsq[2]}) {
        std::vector<double> b(c.p);
        for (std::size_t j = 0; j < c.p; ++j)
            b[j] = j % 2 == 0 ? 1.0 : -0.5;
        const auto cols = all_columns(c.p);
        const double err_n = 1.0 + static_cast<double>(c.p) / (static_cast<double>(c.n - c.p) - 1.0);
        S.add(
            {{sec4, c.name, "10 folds x 50", "nested CV", "Err_XY"},
             {sec4, c.name, "10 folds x 50", "nested CV", "E Err(n)"},
             {sec4, c.name, "10 folds x 50", "naive CV (t on all losses)", "Err_XY"},
             {sec4, c.name, "10 folds x 50", "naive CV (t on all losses)", "E Err(n)"},
             {sec4, c.name, "10 folds x 50", "nested CV, factor K/(K-1) instead of (K-1)/K", "Err_XY"},
             {sec4, c.name, "10 folds x 50", "nested CV without the se guard", "Err_XY"}},
            [&, c, b, cols, err_n](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (c.salt + 0x10000000000ULL + rep));
                const auto D = make_regression(c.n, b, g);
                std::vector<std::size_t> every(c.n);
                for (std::size_t i = 0; i < c.n; ++i)
                    every[i] = i;
                const double err_xy = fitted_error(ols_on(D, every, cols), b);
                const auto r = heldout::nested_cv_interval(
                    [&](auto tr, auto te) { return ols_predict_on(D, tr, te, cols); }, D.y, heldout::loss::squared{},
                    {.folds = 10, .repeats = 50, .level = level, .seed = rep});
                auto in = [](double lo, double hi, double t) { return cell{true, lo <= t && t <= hi, hi - lo}; };
                out.push_back(in(r.lower, r.upper, err_xy));
                out.push_back(in(r.lower, r.upper, err_n));
                out.push_back(in(r.naive_lower, r.naive_upper, err_xy));
                out.push_back(in(r.naive_lower, r.naive_upper, err_n));
                // Variants of the two constants recalled from memory (docs/intervals.md): the
                // reciprocal factor, and no [se_naive, sqrt(K) se_naive] guard.
                const double z = (r.upper - r.lower) / (2 * r.se), k = 10.0, m = std::max(r.mse_estimate, 0.0);
                const double se_alt = std::clamp(std::sqrt(m * k / (k - 1)), r.se_naive, std::sqrt(k) * r.se_naive);
                out.push_back(in(r.value - z * se_alt, r.value + z * se_alt, err_xy));
                const double se_raw = std::sqrt(m * (k - 1) / k);
                out.push_back(in(r.value - z * se_raw, r.value + z * se_raw, err_xy));
            },
            all);
    }

    // Nested CV with an unstable classifier: 1-nearest neighbour, n = 100, 0-1 loss. Err_XY
    // of the rule fitted on all rows: the conditional error averaged over 4000 fresh points
    // (exact at each point); E Err(100) by Monte Carlo as in section 1.
    {
        constexpr std::size_t n = 100;
        const auto err_n = expected_error(nn1_fit, n, w_nn, 0.0, 2000, 500, seed ^ 0x5A5A5A5AULL ^ 0x280000000ULL);
        class_truth.push_back(err_n);
        const std::string name = "1-nearest neighbour, n=100 (unstable)";
        S.add(
            {{sec4, name, "10 folds x 50", "nested CV", "Err_XY"},
             {sec4, name, "10 folds x 50", "nested CV", "E Err(n)"},
             {sec4, name, "10 folds x 50", "naive CV (t on all losses)", "Err_XY"},
             {sec4, name, "10 folds x 50", "naive CV (t on all losses)", "E Err(n)"}},
            [&, err_n](std::uint64_t rep, std::vector<cell>& out) {
                std::mt19937_64 g(seed ^ (0x11000000000ULL + rep));
                const auto D = make_classes(n, w_nn, g);
                const auto cols = all_columns(2);
                std::vector<std::size_t> every(n);
                for (std::size_t i = 0; i < n; ++i)
                    every[i] = i;
                const rule whole = nn1_fit(D, every, cols);
                std::normal_distribution<double> d;
                double err_xy = 0;
                for (int t = 0; t < 4000; ++t) {
                    const double x[2] = {d(g), d(g)};
                    const double q = logistic(w_nn[0] * x[0] + w_nn[1] * x[1]);
                    err_xy += (whole(x) == 1 ? 1 - q : q) / 4000.0;
                }
                const auto r = heldout::nested_cv_interval(
                    [&](auto tr, auto te) {
                        const auto l = classify(nn1_fit, D, tr, te, cols);
                        return std::vector<double>(l.begin(), l.end());
                    },
                    D.y, heldout::loss::zero_one{0.5}, {.folds = 10, .repeats = 50, .level = level, .seed = rep});
                auto in = [](double lo, double hi, double t) { return cell{true, lo <= t && t <= hi, hi - lo}; };
                out.push_back(in(r.lower, r.upper, err_xy));
                out.push_back(in(r.lower, r.upper, err_n.first));
                out.push_back(in(r.naive_lower, r.naive_upper, err_xy));
                out.push_back(in(r.naive_lower, r.naive_upper, err_n.first));
            },
            all);
    }

    // ---- 5. one test set, fixed rules (logistic grid, exact truths)
    const std::string sec5 = "one test set";
    const double err_true = true_error(), auc_true = true_auc();
    S.add(
        {{sec5, "logistic grid, fixed rule", "100 rows", "Wilson", "error rate"},
         {sec5, "logistic grid, fixed rule", "100 rows", "Clopper-Pearson", "error rate"},
         {sec5, "logistic grid, fixed rule", "100 rows", "Agresti-Coull", "error rate"},
         {sec5, "logistic grid, fixed rule", "100 rows", "t", "error rate"},
         {sec5, "logistic grid, fixed rule", "100 rows", "BCa", "error rate"},
         {sec5, "logistic grid, fixed rule", "100 rows", "DeLong (logit)", "AUC"},
         {sec5, "logistic grid, fixed rule", "100 rows", "Newcombe score", "AUC"},
         {sec5, "logistic grid, fixed rule", "100 rows", "BCa", "AUC"}},
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
            heldout::aggregator err(cerr);
            err.record(s, y, label);
            out.push_back(check(err.estimate(cerr, ci::wilson, level), err_true));
            out.push_back(check(err.estimate(cerr, ci::clopper_pearson, level), err_true));
            out.push_back(check(err.estimate(cerr, ci::agresti_coull, level), err_true));
            out.push_back(check(err.estimate(cerr, ci::t, level), err_true));
            out.push_back(guarded([&] { return check(err.estimate(cerr, ci::bca(1000, rep), level), err_true); }));
            heldout::aggregator a(auc);
            a.record(s, y, score);
            out.push_back(guarded([&] { return check(a.estimate(auc, ci::delong, level), auc_true); }));
            out.push_back(guarded([&] { return check(a.estimate(auc, ci::newcombe, level), auc_true); }));
            out.push_back(guarded([&] { return check(a.estimate(auc, ci::bca(1000, rep), level), auc_true); }));
        },
        all);

    // Class imbalance on one test set: the grid process with intercept -4.1 (5.1 % positives),
    // the rule "predict 1 when x > 1.5", 200 rows (about 10 positives).
    const double a_grid_rare = -4.1, err_rare = true_error(a_grid_rare, 1.5), auc_rare = true_auc(a_grid_rare);
    S.add(
        {{sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "Wilson", "error rate"},
         {sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "Clopper-Pearson", "error rate"},
         {sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "Agresti-Coull", "error rate"},
         {sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "t", "error rate"},
         {sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "DeLong (logit)", "AUC"},
         {sec5, "logistic grid, 5% positives, fixed rule", "200 rows", "Newcombe score", "AUC"}},
        [&](std::uint64_t rep, std::vector<cell>& out) {
            std::mt19937_64 g(seed ^ (0x310000000ULL + rep));
            std::uniform_int_distribution<int> pick(0, grid - 1);
            std::uniform_real_distribution<double> u(0.0, 1.0);
            const std::size_t m = 200;
            std::vector<int> y(m), label(m);
            std::vector<double> score(m);
            std::vector<std::size_t> rows(m);
            for (std::size_t i = 0; i < m; ++i) {
                const double x = grid_x(pick(g));
                y[i] = u(g) < prob_at(a_grid_rare, x) ? 1 : 0;
                label[i] = x > 1.5 ? 1 : 0;
                score[i] = x;
                rows[i] = i;
            }
            const heldout::split s{{}, rows, 0, 0, 0, {}};
            heldout::aggregator err(cerr);
            err.record(s, y, label);
            out.push_back(guarded([&] { return check(err.estimate(cerr, ci::wilson, level), err_rare); }));
            out.push_back(guarded([&] { return check(err.estimate(cerr, ci::clopper_pearson, level), err_rare); }));
            out.push_back(guarded([&] { return check(err.estimate(cerr, ci::agresti_coull, level), err_rare); }));
            out.push_back(guarded([&] { return check(err.estimate(cerr, ci::t, level), err_rare); }));
            heldout::aggregator a(auc);
            a.record(s, y, score);
            out.push_back(guarded([&] { return check(a.estimate(auc, ci::delong, level), auc_rare); }));
            out.push_back(guarded([&] { return check(a.estimate(auc, ci::newcombe, level), auc_rare); }));
        },
        all);
    // Tests on one test set under a true null: two fixed rules equally good by symmetry
    // (x ~ N(0, I_2), P(y = 1 | x) = logistic(1.5 (x1 + x2)); A predicts x1 > 0, B x2 > 0).
    const std::string sec6 = "comparison test on one test set, true null";
    S.add(
        {{sec6, "two symmetric fixed rules", "100 rows", "McNemar exact", "rejects at 5%"},
         {sec6, "two symmetric fixed rules", "100 rows", "McNemar mid-p", "rejects at 5%"},
         {sec6, "two symmetric fixed rules", "100 rows", "McNemar chi-squared", "rejects at 5%"},
         {sec6, "two symmetric fixed rules", "100 rows", "McNemar continuity-corrected", "rejects at 5%"},
         {sec6, "two symmetric fixed rules", "100 rows", "paired percentile bootstrap", "rejects at 5%"},
         {sec6, "two symmetric fixed rules", "100 rows", "paired BCa bootstrap", "rejects at 5%"}},
        [&](std::uint64_t rep, std::vector<cell>& out) {
            std::mt19937_64 g(seed ^ (0x320000000ULL + rep));
            std::normal_distribution<double> d;
            std::uniform_real_distribution<double> u(0.0, 1.0);
            const std::size_t m = 100;
            std::vector<int> y(m), la(m), lb(m);
            for (std::size_t i = 0; i < m; ++i) {
                const double x1 = d(g), x2 = d(g);
                y[i] = u(g) < logistic(1.5 * (x1 + x2)) ? 1 : 0;
                la[i] = x1 > 0 ? 1 : 0;
                lb[i] = x2 > 0 ? 1 : 0;
            }
            for (auto how :
                 {paired::mcnemar_exact, paired::mcnemar_mid_p, paired::mcnemar_chi_squared, paired::mcnemar_corrected,
                  paired::bootstrap_percentile(1000, rep), paired::bootstrap_bca(1000, rep)})
                out.push_back(guarded([&] { return rejects(heldout::compare(cerr, y, la, lb, how)); }));
        },
        all);

    // Run: each worker takes every threads-th replication; cells land by replication number,
    // so the table is the same for any thread count.
    const auto t0 = std::chrono::steady_clock::now();
    std::vector<std::vector<cell>> cells(reps);
    std::vector<std::thread> pool;
    for (unsigned w = 0; w < threads; ++w)
        pool.emplace_back([&, w] {
            for (std::size_t r = w; r < reps; r += threads)
                for (std::size_t k = 0; k < S.parts.size(); ++k) {
                    if (r >= S.max_rep[k]) {
                        const std::size_t end = k + 1 < S.first.size() ? S.first[k + 1] : S.rows.size();
                        cells[r].resize(cells[r].size() + (end - S.first[k]), cell{false, false, -1});
                        continue;
                    }
                    S.parts[k](r, cells[r]);
                }
        });
    for (auto& t : pool)
        t.join();
    for (std::size_t r = 0; r < reps; ++r)
        for (std::size_t i = 0; i < S.rows.size(); ++i) {
            const cell& c = cells[r][i];
            if (c.width < 0) // replication not run for this row
                continue;
            ++S.rows[i].reps;
            if (!c.defined) {
                ++S.rows[i].undefined;
                continue;
            }
            S.rows[i].hits += c.hit ? 1 : 0;
            S.rows[i].width += c.width;
            ++S.rows[i].runs;
        }
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();

    std::string text; // the tables, printed and (with --record) written to coverage_full_run.md
    auto put = [&text](const char* fmt, auto... args) {
        char buf[1024];
        std::snprintf(buf, sizeof buf, fmt, args...);
        text += buf;
    };
    put("Coverage of nominal 95%% intervals and rejection rates of 5%% tests under a true null;\n"
        "%zu replications per row, seed %llu, %u threads%s.\n",
        reps, static_cast<unsigned long long>(seed), threads, quick ? " (quick run)" : "");
    std::string section;
    for (const auto& r : S.rows) {
        if (r.section != section) {
            section = r.section;
            put("\n### %s\n\n", section.c_str());
            text += "| process | plan | method | target | rate | MC s.e. | mean width | no interval | no interval "
                    "counted as miss |\n";
            text += "|---|---|---|---|---:|---:|---:|---:|---:|\n";
        }
        const double runs = static_cast<double>(r.runs);
        const double c = runs > 0 ? static_cast<double>(r.hits) / runs : 0.0;
        const double miss = r.reps > 0 ? static_cast<double>(r.hits) / static_cast<double>(r.reps) : 0.0;
        put("| %s | %s | %s | %s | %.3f | %.3f | %s | %zu | %.3f |\n", r.process.c_str(), r.plan.c_str(),
            r.method.c_str(), r.target.c_str(), c, std::sqrt(c * (1 - c) / std::max(runs, 1.0)),
            r.target == "rejects at 5%" ? "-" : std::to_string(r.width / std::max(runs, 1.0)).substr(0, 6).c_str(),
            r.undefined, miss);
    }
    text += "\nTruths: least squares E Err(n_train) = 1 + p/(n_train - p - 1), Err_XY = 1 + |b - beta|^2;";
    for (std::size_t k = 0; k < classes.size(); ++k)
        put(" %s E Err(%zu) = %.5f (MC s.e. %.5f);", classes[k].name.c_str(), classes[k].n * 9 / 10,
            class_truth[k].first, class_truth[k].second);
    put(" nested CV: 1-nearest neighbour E Err(100) = %.5f (MC s.e. %.5f);", class_truth.back().first,
        class_truth.back().second);
    put(" logistic grid error rate %.6f, AUC %.6f; with 5%% positives (rule x > 1.5) %.6f, AUC %.6f.\n", err_true,
        auc_true, err_rare, auc_rare);
    put("(%.1f s on %u threads)\n", secs, threads);

    std::fputs(text.c_str(), stdout);
    if (record_dir) {
        // The one command that regenerates the recorded rates (read by the quick run) and the
        // tables of docs/intervals.md: example_coverage_study --record examples/coverage
        const std::string dir = record_dir;
        std::FILE* inc = std::fopen((dir + "/coverage_recorded.inc").c_str(), "w");
        std::FILE* md = std::fopen((dir + "/coverage_full_run.md").c_str(), "w");
        if (!inc || !md) {
            std::fprintf(stderr, "cannot write to %s\n", record_dir);
            return 2;
        }
        std::fprintf(inc,
                     "// Written by the full run of the coverage study, %zu replications, seed %llu, %u threads:\n"
                     "//   example_coverage_study --record examples/coverage\n"
                     "// (from the source directory; it also writes coverage_full_run.md, the tables of\n"
                     "// docs/intervals.md). Do not edit: rerun after any change meant to move a rate.\n",
                     reps, static_cast<unsigned long long>(seed), threads);
        for (const auto& r : S.rows)
            std::fprintf(inc, "{\"%s\", %.6f},\n", key_of(r).c_str(),
                         r.runs > 0 ? static_cast<double>(r.hits) / static_cast<double>(r.runs) : 0.0);
        std::fputs(text.c_str(), md);
        std::fclose(inc);
        std::fclose(md);
        // The same tables go into docs/intervals.md between its markers (DIR/../../docs when
        // DIR is examples/coverage of a source tree), so the docs cannot drift from the run.
        const std::string doc = dir + "/../../docs/intervals.md";
        std::string body;
        if (std::FILE* f = std::fopen(doc.c_str(), "r")) {
            char buf[4096];
            for (std::size_t got; (got = std::fread(buf, 1, sizeof buf, f)) > 0;)
                body.append(buf, got);
            std::fclose(f);
        }
        const std::string open_mark = "<!-- coverage tables: examples/coverage/coverage_full_run.md, written by the "
                                      "full run; do not edit -->\n",
                          close_mark = "<!-- end of coverage tables -->\n";
        const auto i = body.find(open_mark), j = body.find(close_mark);
        if (i == std::string::npos || j == std::string::npos || j < i) {
            std::fprintf(stderr, "%s: no coverage-table markers; docs not updated\n", doc.c_str());
            return 2;
        }
        std::string tables = text;
        for (std::size_t k = 0; (k = tables.find("\n### ", k)) != std::string::npos; k += 6)
            tables.replace(k, 5, "\n#### ");
        while (!tables.empty() && tables.back() == '\n')
            tables.pop_back();
        body = body.substr(0, i + open_mark.size()) + "\n" + tables + "\n\n" + body.substr(j);
        std::FILE* f = std::fopen(doc.c_str(), "w");
        if (!f) {
            std::fprintf(stderr, "cannot write %s\n", doc.c_str());
            return 2;
        }
        std::fputs(body.c_str(), f);
        std::fclose(f);
    }
    if (!quick)
        return 0;
    // Quick run: each row within 4 Monte-Carlo s.e. (of this run's size) of the recorded rate.
    std::map<std::string, double> want;
    for (const auto& x : full_run)
        want[x.key] = x.rate;
    std::size_t bad = 0, checked = 0;
    for (const auto& r : S.rows) {
        const auto it = want.find(key_of(r));
        if (it == want.end()) {
            std::printf("FAIL no recorded full-run rate for: %s\n", key_of(r).c_str());
            ++bad;
            continue;
        }
        const double runs = static_cast<double>(std::max<std::size_t>(r.runs, 1));
        const double e = it->second, got = static_cast<double>(r.hits) / runs;
        const double band = 4 * std::sqrt(e * (1 - e) / runs) + 2 / runs;
        ++checked;
        if (std::abs(got - e) > band) {
            std::printf("FAIL %s: %.3f, recorded %.3f (band +-%.3f)\n", key_of(r).c_str(), got, e, band);
            ++bad;
        }
    }
    std::printf("\n%zu passed, %zu failed\n", checked - std::min(checked, bad), bad);
    return bad == 0 ? 0 : 1;
}
