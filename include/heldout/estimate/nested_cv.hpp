// heldout/estimate/nested_cv.hpp — the nested cross-validation confidence interval for
// prediction error of Bates, Hastie & Tibshirani ("Cross-validation: what does it estimate
// and how well does it do it?", JASA 119(546):1434-1445, 2023; arXiv 2104.00673).
//
//   auto fit_predict = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
//       Model m = fit(X, y, train);
//       return m.predict(X, test);                   // predictions for test, in its order
//   };
//   heldout::nested_cv_result r = heldout::nested_cv_interval(
//       fit_predict, y, heldout::loss::squared{}, {.folds = 10, .repeats = 200, .level = 0.90, .seed = 1});
//   // r.value [r.lower, r.upper]; r.se, r.se_naive, r.guard, r.cv_estimate, ...
//
// Algorithm (R repetitions of K-fold; K >= 3, every fold >= 2 rows):
//   repetition r: a random partition I_1..I_K of rows 0..n-1; for each k:
//     outer: fit on D \ I_k, e_out = losses on I_k (ordinary K-fold CV losses);
//     inner: for j != k, fit on D \ (I_k u I_j), losses on I_j -> e_in
//            (the inner (K-1)-fold CV reuses the outer partition, not a fresh split);
//     a_rk = (mean e_in - mean e_out)^2,  b_rk = var(e_out) / |I_k|  (var: |I_k| - 1).
//   MSE = mean(a) - mean(b); Err_NCV = mean over (r, k) of mean e_in;
//   Err_CV = mean of all R n outer losses.
//   bias = (1 + (K-2)/K) (Err_NCV - Err_CV); value = Err_NCV - bias;
//   se = sqrt(max(MSE, 0) (K-1)/K), kept within [se_naive, sqrt(K) se_naive], where
//   se_naive = sd of all R n outer losses (denominator R n - 1) / sqrt(n) — repetitions add
//   no new rows; interval value +- z_{1-a/2} se (normal quantile).
// The constants follow Bates, Hastie & Tibshirani (2023), which marks the (K-1)/K factor and
// the guard as recalled from the paper rather than checked against it; `guard` records
// which bound was applied. Cost: R K^2 fits. The paper needs R of the order of hundreds
// for a stable MSE estimate; its experiments used 90% intervals.
//
// Partition: the library's k-fold assignment, heldout::repeated_kfold{.folds = K,
// .repeats = R, .seed = seed} (plan/repeated_kfold.hpp; repetition r draws from
// heldout::rng(seed, r), fold sizes floor(n/K) or ceil(n/K)), so repetition 0 is exactly
// heldout::kfold{.folds = K, .seed = seed}. Test and train rows are ascending.
//
// nested_cv_interval_from_losses takes the per-(r, k) e_out and e_in directly.
// Policies: K < 3, R = 0, a fold with fewer than 2 rows, a level outside (0, 1), a
// prediction count different from the test rows, or a non-finite loss -> input_error.
#pragma once

#include <heldout/core/loss.hpp>
#include <heldout/core/random.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/plan/repeated_kfold.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Folds K, repetitions R, level and seed of the nested CV interval.
struct nested_cv_options {
    std::size_t folds = 10;
    std::size_t repeats = 200;
    double level = 0.95;
    std::uint64_t seed = 0;
    /// Called after every fit with (fits done, R K^2), on the caller's thread; optional.
    std::function<void(std::size_t done, std::size_t total)> progress{};
};

/// Which bound of [se_naive, sqrt(K) se_naive] was applied to the standard error.
enum class nested_cv_guard {
    none,          ///< sqrt(max(MSE, 0) (K-1)/K) was within the bounds
    naive_floor,   ///< raised to se_naive
    sqrt_k_ceiling ///< lowered to sqrt(K) se_naive
};

/// The nested CV interval with its ingredients.
struct nested_cv_result {
    double value = 0; ///< bias-corrected centre Err_NCV - bias
    double se = 0;    ///< guarded standard error
    double lower = 0;
    double upper = 0;
    double level = 0;
    double se_naive = 0;        ///< sd(outer losses) / sqrt(n)
    double mse_estimate = 0;    ///< mean(a) - mean(b), may be negative
    double bias = 0;            ///< (1 + (K-2)/K)(Err_NCV - Err_CV)
    double cv_estimate = 0;     ///< Err_CV
    double nested_estimate = 0; ///< Err_NCV
    nested_cv_guard guard = nested_cv_guard::none;
    double naive_lower = 0; ///< Err_CV -+ z se_naive: the naive interval, known to undercover
    double naive_upper = 0;
    std::size_t folds = 0;
    std::size_t repeats = 0;
    std::size_t n = 0;
};

/// The losses of one (repetition, fold) cell: e_out on I_k and e_in of the inner CV.
struct nested_cv_cell {
    std::vector<double> outer;
    std::vector<double> inner;
};

/// The interval from per-cell losses, cells ordered repetition by repetition (R K cells).
template <class = void>
nested_cv_result nested_cv_interval_from_losses(std::span<const nested_cv_cell> cells, std::size_t folds,
                                                double level = 0.95) {
    constexpr std::string_view who = "heldout::nested_cv_interval_from_losses";
    detail::check_level(who, level);
    if (folds < 3)
        detail::fail(who, "folds", "need at least 3 folds (the inner CV has K - 1), got " + std::to_string(folds));
    detail::check_nonempty(who, "cells", cells.size());
    if (cells.size() % folds != 0)
        detail::fail(who, "cells",
                     std::to_string(cells.size()) + " cells is not a multiple of " + std::to_string(folds) + " folds");
    const std::size_t R = cells.size() / folds;
    std::size_t n = 0;
    for (std::size_t r = 0; r < R; ++r) {
        std::size_t nr = 0;
        for (std::size_t k = 0; k < folds; ++k)
            nr += cells[r * folds + k].outer.size();
        if (r == 0)
            n = nr;
        else if (nr != n)
            detail::fail_at(who, "cells",
                            "repetition has " + std::to_string(nr) + " outer losses, repetition 0 has " +
                                std::to_string(n),
                            r * folds);
    }
    // Every loss in units of the power of two that brings the largest |loss| to [1, 2) (exact):
    // losses near +-1e308 do not overflow the sums and squares, nor do losses near 1e-200
    // underflow the squares (a silent zero-width interval); the results are scaled back.
    double top = 0;
    for (const auto& cell : cells) {
        for (double x : cell.outer)
            top = std::abs(x) > top ? std::abs(x) : top;
        for (double x : cell.inner)
            top = std::abs(x) > top ? std::abs(x) : top;
    }
    const double unit = detail::unit_scale(top);
    detail::compensated_sum a_sum, b_sum, inner_sum, outer_sum;
    for (std::size_t c = 0; c < cells.size(); ++c) {
        const auto& cell = cells[c];
        if (cell.outer.size() < 2)
            detail::fail_at(who, "cells", "a fold needs at least 2 outer losses", c);
        if (cell.inner.empty())
            detail::fail_at(who, "cells", "no inner losses", c);
        detail::check_finite(who, "cells.outer", std::span<const double>(cell.outer));
        detail::check_finite(who, "cells.inner", std::span<const double>(cell.inner));
        const auto o = detail::two_pass_mean_variance(std::span<const double>(cell.outer));
        const double om = o.mean * unit, to_unit = unit / o.unit; // the cell's own unit to ours
        detail::compensated_sum si;
        for (double x : cell.inner)
            si.add(x * unit);
        const double mi = si.value() / static_cast<double>(cell.inner.size());
        a_sum.add((mi - om) * (mi - om));
        b_sum.add(o.scaled_variance * to_unit * to_unit / static_cast<double>(cell.outer.size()));
        inner_sum.add(mi);
        for (double x : cell.outer)
            outer_sum.add(x * unit);
    }
    const double C = static_cast<double>(cells.size());
    const double K = static_cast<double>(folds);
    nested_cv_result r;
    r.level = level;
    r.folds = folds;
    r.repeats = R;
    r.n = n;
    const double mse = a_sum.value() / C - b_sum.value() / C; // in unit^2
    r.mse_estimate = mse / unit / unit;                       // 0 or inf when beyond the range
    r.nested_estimate = inner_sum.value() / C / unit;
    const double total = static_cast<double>(R * n);
    const double cv = outer_sum.value() / total;
    r.cv_estimate = cv / unit;
    detail::compensated_sum dev;
    for (const auto& cell : cells)
        for (double x : cell.outer)
            dev.add((x * unit - cv) * (x * unit - cv));
    r.se_naive = std::sqrt(dev.value() / (total - 1.0)) / std::sqrt(static_cast<double>(n)) / unit;
    r.bias = (1.0 + (K - 2.0) / K) * (r.nested_estimate - r.cv_estimate);
    r.value = r.nested_estimate - r.bias;
    const double se = std::sqrt(std::max(mse, 0.0) * (K - 1.0) / K) / unit;
    const double ceiling = std::sqrt(K) * r.se_naive;
    if (se < r.se_naive) {
        r.se = r.se_naive;
        r.guard = nested_cv_guard::naive_floor;
    } else if (se > ceiling) {
        r.se = ceiling;
        r.guard = nested_cv_guard::sqrt_k_ceiling;
    } else {
        r.se = se;
        r.guard = nested_cv_guard::none;
    }
    const double z = detail::two_sided_z(level);
    r.lower = r.value - z * r.se;
    r.upper = r.value + z * r.se;
    r.naive_lower = r.cv_estimate - z * r.se_naive;
    r.naive_upper = r.cv_estimate + z * r.se_naive;
    detail::check_bounds(who, "cells", r.lower, r.upper);
    detail::check_bounds(who, "cells", r.naive_lower, r.naive_upper);
    return r;
}

/// The K folds (test rows, ascending) of repetition `repeat` as nested_cv_interval uses them.
inline std::vector<std::vector<std::size_t>> nested_cv_folds(std::size_t n, std::size_t folds, std::uint64_t seed,
                                                             std::size_t repeat) {
    std::vector<std::vector<std::size_t>> out(folds);
    for (const split& s : repeated_kfold{.folds = folds, .repeats = repeat + 1, .seed = seed}.splits(n))
        if (s.repeat == repeat)
            out[s.fold].assign(s.test.begin(), s.test.end());
    return out;
}

/// Nested CV interval: runs R K^2 fits through fit_predict(train_rows, test_rows).
template <class FitPredict, value_range T, pointwise_loss L>
nested_cv_result nested_cv_interval(FitPredict&& fit_predict, const T& truth, const L& loss,
                                    const nested_cv_options& o = {}) {
    constexpr std::string_view who = "heldout::nested_cv_interval";
    auto y = values_of(truth, who, "truth");
    detail::check_nonempty(who, "truth", y.size());
    detail::check_finite(who, "truth", y);
    detail::check_level(who, o.level);
    if (o.folds < 3)
        detail::fail(who, "folds", "need at least 3 folds (the inner CV has K - 1), got " + std::to_string(o.folds));
    if (o.repeats == 0)
        detail::fail(who, "repeats", "need at least 1 repetition");
    const std::size_t n = y.size();
    if (n < 2 * o.folds)
        detail::fail(who, "truth",
                     std::to_string(n) + " rows cannot make " + std::to_string(o.folds) + " folds of at least 2 rows");
    const std::size_t K = o.folds;
    std::vector<nested_cv_cell> cells(o.repeats * K);
    std::vector<std::size_t> train;
    train.reserve(n);
    std::vector<unsigned char> excluded(n);
    // Fits on train, scores test, appends the losses to out.
    const std::size_t total_fits = o.repeats * K * K;
    std::size_t fits_done = 0;
    auto run = [&](std::span<const std::size_t> test, std::vector<double>& out) {
        const auto& pred = fit_predict(std::span<const std::size_t>(train), test);
        if (o.progress)
            o.progress(++fits_done, total_fits);
        auto p = values_of(pred, who, "fit_predict result");
        detail::check_same_size(who, "fit_predict result", test.size(), p.size(), "test rows");
        for (std::size_t i = 0; i < test.size(); ++i) {
            const double l = loss.value(static_cast<double>(y[test[i]]), static_cast<double>(p[i]));
            if (!std::isfinite(l))
                detail::fail_at(who, "fit_predict result", "loss is not finite", i);
            out.push_back(l);
        }
    };
    auto build_train = [&]() {
        train.clear();
        for (std::size_t i = 0; i < n; ++i)
            if (!excluded[i])
                train.push_back(i);
    };
    std::vector<std::vector<std::size_t>> part(K);
    for (const split& s : repeated_kfold{.folds = K, .repeats = o.repeats, .seed = o.seed}.splits(n)) {
        part[s.fold].assign(s.test.begin(), s.test.end());
        if (s.fold + 1 < K)
            continue;
        const std::size_t r = s.repeat; // all K folds of repetition r are in: run its K^2 fits
        for (std::size_t k = 0; k < K; ++k) {
            auto& cell = cells[r * K + k];
            std::fill(excluded.begin(), excluded.end(), 0);
            for (std::size_t i : part[k])
                excluded[i] = 1;
            build_train();
            run(part[k], cell.outer);
            for (std::size_t j = 0; j < K; ++j) {
                if (j == k)
                    continue;
                for (std::size_t i : part[j])
                    excluded[i] = 1;
                build_train();
                run(part[j], cell.inner);
                for (std::size_t i : part[j])
                    excluded[i] = 0;
            }
        }
    }
    auto res = nested_cv_interval_from_losses(cells, K, o.level);
    return res;
}

HELDOUT_NAMESPACE_END
