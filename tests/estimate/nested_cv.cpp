// Tests for heldout/estimate/nested_cv.hpp: the nested CV interval of Bates, Hastie &
// Tibshirani (2023), from given losses and end to end through fit_predict.
#include <heldout/estimate/nested_cv.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/plan/kfold.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <set>
#include <span>
#include <vector>

using heldout::nested_cv_cell;

TEST_SUITE("estimate/nested_cv") {
    TEST_CASE("Bates, Hastie & Tibshirani 2023 formula-level check: K = 3, R = 2, n = 9 worked by hand") {
        // Synthetic losses from Bates, Hastie & Tibshirani 2023 (they check the arithmetic only).
        const std::vector<nested_cv_cell> cells{
            {{0.83, 0.67, 0.57}, {1.05, 0.67, 1.43, 1.08, 0.98, 0.28}},
            {{0.12, 0.25, 0.94}, {0.96, 0.22, 1.12, 0.50, 0.50, 1.85}},
            {{0.76, 0.88, 0.88}, {0.22, 1.10, 3.49, 0.33, 1.52, 1.63}},
            {{1.34, 0.47, 0.57}, {0.33, 0.86, 2.18, 0.50, 0.11, 0.93}},
            {{1.36, 0.62, 2.25}, {0.78, 0.91, 0.36, 0.69, 1.60, 1.61}},
            {{1.71, 1.27, 1.08}, {0.11, 0.45, 3.94, 0.59, 1.43, 0.85}},
        };
        const auto r = heldout::nested_cv_interval_from_losses(cells, 3, 0.90);
        CHECK(r.folds == 3);
        CHECK(r.repeats == 2);
        CHECK(r.n == 9);
        CHECK(heldout_test::close(r.mse_estimate, 0.0514361111111, 1e-11));
        CHECK(heldout_test::close(r.nested_estimate, 1.03222222222, 1e-11));
        CHECK(heldout_test::close(r.cv_estimate, 0.920555555556, 1e-11));
        CHECK(heldout_test::close(r.bias, 0.148888888889, 1e-11)); // (1 + 1/3)(Err_NCV - Err_CV)
        CHECK(heldout_test::close(r.se, 0.185177592437, 1e-11));   // sqrt(MSE * 2/3)
        CHECK(heldout_test::close(r.se_naive, 0.174095129214, 1e-11));
        CHECK(r.guard == heldout::nested_cv_guard::none); // bounds [0.174095, 0.301541]
        CHECK(heldout_test::close(r.value, 0.883333333333, 1e-11));
        CHECK(heldout_test::close(r.lower, 0.578743298783, 1e-11));
        CHECK(heldout_test::close(r.upper, 1.18792336788, 1e-11));
        CHECK(heldout_test::close(r.naive_lower, 0.634194550834, 1e-11));
        CHECK(heldout_test::close(r.naive_upper, 1.20691656028, 1e-11));
        CHECK(r.level == 0.90);
    }
    TEST_CASE("live reference: the formula in numpy on random cells (negative MSE: naive floor)") {
        heldout_test::reference_table ref("ref_intervals");
        const auto& shape = ref.get("ncv.shape");
        const auto K = static_cast<std::size_t>(shape[0]), R = static_cast<std::size_t>(shape[1]);
        std::vector<nested_cv_cell> cells;
        for (std::size_t r = 0; r < R; ++r)
            for (std::size_t k = 0; k < K; ++k) {
                const std::string p = "ncv.r" + std::to_string(r) + "k" + std::to_string(k) + ".";
                cells.push_back({ref.get(p + "outer"), ref.get(p + "inner")});
            }
        const auto& e = ref.get("ncv.result");
        const auto r = heldout::nested_cv_interval_from_losses(cells, K, 0.90);
        CHECK(heldout_test::close(r.mse_estimate, e[0], 1e-12));
        CHECK(heldout_test::close(r.nested_estimate, e[1], 1e-13));
        CHECK(heldout_test::close(r.cv_estimate, e[2], 1e-13));
        CHECK(heldout_test::close(r.bias, e[3], 1e-11));
        CHECK(heldout_test::close(r.se_naive, e[4], 1e-12));
        CHECK(heldout_test::close(r.se, e[5], 1e-12));
        CHECK(heldout_test::close(r.lower, e[6], 1e-12)); // scipy norm.ppf(0.95)
        CHECK(heldout_test::close(r.upper, e[7], 1e-12));
        CHECK(e[0] < 0);
        CHECK(r.guard == heldout::nested_cv_guard::naive_floor);
    }
    TEST_CASE("the sqrt(K) ceiling guard") {
        // Inner means far from outer means make a = (mean e_in - mean e_out)^2 large.
        std::vector<nested_cv_cell> cells;
        for (int k = 0; k < 3; ++k)
            cells.push_back({{1.0, 1.1, 0.9}, {k == 0 ? 10.0 : 0.0, 0.0, 0.0, 0.0, 0.0, 0.0}});
        const auto r = heldout::nested_cv_interval_from_losses(cells, 3, 0.95);
        CHECK(r.guard == heldout::nested_cv_guard::sqrt_k_ceiling);
        CHECK(heldout_test::close(r.se, std::sqrt(3.0) * r.se_naive, 1e-15));
    }
    TEST_CASE("end to end: R K^2 fits, inner folds reuse the outer partition, equals the formula on the same losses") {
        std::mt19937_64 gen(17); // test data only
        std::normal_distribution<double> d;
        const std::size_t n = 23, K = 4, R = 3;
        std::vector<double> y(n);
        for (auto& v : y)
            v = 2.0 + d(gen);
        // Learner: predict the training mean (so every fit is cheap and checkable).
        std::size_t calls = 0;
        std::vector<std::vector<std::size_t>> tests_seen;
        auto fit_predict = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            ++calls;
            CHECK(std::is_sorted(train.begin(), train.end()));
            for (std::size_t t : test) // train and test are disjoint
                CHECK(!std::binary_search(train.begin(), train.end(), t));
            tests_seen.emplace_back(test.begin(), test.end());
            double s = 0;
            for (std::size_t i : train)
                s += y[i];
            return std::vector<double>(test.size(), s / static_cast<double>(train.size()));
        };
        const heldout::nested_cv_options o{.folds = K, .repeats = R, .level = 0.9, .seed = 5};
        const auto res = heldout::nested_cv_interval(fit_predict, y, heldout::loss::squared{}, o);
        CHECK(calls == R * K * K);
        // Brute force (self-written): rebuild every cell from the documented partition.
        std::vector<nested_cv_cell> cells;
        for (std::size_t r = 0; r < R; ++r) {
            const auto folds = heldout::nested_cv_folds(n, K, 5, r);
            std::set<std::vector<std::size_t>> fold_set(folds.begin(), folds.end());
            for (const auto& f : folds)
                CHECK((f.size() == 5 || f.size() == 6)); // 23 = 6 + 6 + 6 + 5
            for (std::size_t k = 0; k < K; ++k) {
                nested_cv_cell c;
                auto mean_without = [&](std::initializer_list<std::size_t> drop) {
                    double s = 0;
                    std::size_t m = 0;
                    for (std::size_t j = 0; j < K; ++j)
                        if (std::find(drop.begin(), drop.end(), j) == drop.end())
                            for (std::size_t i : folds[j]) {
                                s += y[i];
                                ++m;
                            }
                    return s / static_cast<double>(m);
                };
                const double mo = mean_without({k});
                for (std::size_t i : folds[k])
                    c.outer.push_back((y[i] - mo) * (y[i] - mo));
                for (std::size_t j = 0; j < K; ++j) {
                    if (j == k)
                        continue;
                    const double mi = mean_without({k, j});
                    for (std::size_t i : folds[j])
                        c.inner.push_back((y[i] - mi) * (y[i] - mi));
                }
                cells.push_back(c);
            }
            // every test set passed in repetition r is one of its folds (inner CV reuses the partition)
            for (std::size_t c = r * K * K; c < (r + 1) * K * K; ++c)
                CHECK(fold_set.count(tests_seen[c]) == 1);
        }
        const auto ref = heldout::nested_cv_interval_from_losses(cells, K, 0.9);
        CHECK(heldout_test::close(res.value, ref.value, 1e-13));
        CHECK(heldout_test::close(res.se, ref.se, 1e-13));
        CHECK(heldout_test::close(res.lower, ref.lower, 1e-13));
        CHECK(heldout_test::close(res.upper, ref.upper, 1e-13));
        CHECK(heldout_test::close(res.mse_estimate, ref.mse_estimate, 1e-12, 1e-15));
        CHECK(res.guard == ref.guard);
    }
    TEST_CASE("the partition: a permutation cut into near-equal folds, seeded") {
        const auto a = heldout::nested_cv_folds(10, 3, 1, 0);
        const auto b = heldout::nested_cv_folds(10, 3, 1, 0);
        const auto c = heldout::nested_cv_folds(10, 3, 1, 1);
        CHECK(a == b);
        CHECK(a != c);
        CHECK(a[0].size() == 4);
        CHECK(a[1].size() == 3);
        CHECK(a[2].size() == 3);
        std::vector<std::size_t> all;
        for (const auto& f : a)
            all.insert(all.end(), f.begin(), f.end());
        std::sort(all.begin(), all.end());
        for (std::size_t i = 0; i < 10; ++i)
            CHECK(all[i] == i);
        // documented: the library's repeated k-fold assignment (repetition 0 = heldout::kfold)
        for (const heldout::split& s : heldout::kfold{.folds = 3, .seed = 1}.splits(10))
            CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == a[s.fold]);
        for (const heldout::split& s : heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 1}.splits(10))
            if (s.repeat == 1)
                CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == c[s.fold]);
    }
    TEST_CASE("losses near 1e308 and near 1e-211: the result of the scaled losses, scaled back") {
        // The interval is homogeneous in the losses (Bates, Hastie & Tibshirani's estimator:
        // means of degree 1, MSE of degree 2), so with c = 2^k, exact in binary floating point,
        // the losses moved to the middle of the range are the oracle, bit for bit. Before: NaN
        // at 2^1000 (overflowed sums), and se = 0 at 2^-700 (underflowed squares), silently.
        const auto cells_at = [](int k) {
            std::vector<heldout::nested_cv_cell> cells;
            for (int c = 0; c < 6; ++c) {
                heldout::nested_cv_cell cell;
                for (int i = 0; i < 4; ++i)
                    cell.outer.push_back(std::ldexp(0.6 + 0.1 * ((i * 7 + c * 3) % 5), k));
                for (int i = 0; i < 5; ++i)
                    cell.inner.push_back(std::ldexp(0.5 + 0.1 * ((i * 3 + c) % 4), k));
                cells.push_back(cell);
            }
            return cells;
        };
        const auto mid = heldout::nested_cv_interval_from_losses(cells_at(0), 3);
        for (int k : {1000, -700}) {
            CAPTURE(k);
            const auto r = heldout::nested_cv_interval_from_losses(cells_at(k), 3);
            CHECK(r.value == std::ldexp(mid.value, k));
            CHECK(r.se == std::ldexp(mid.se, k));
            CHECK(r.se_naive == std::ldexp(mid.se_naive, k));
            CHECK(r.lower == std::ldexp(mid.lower, k));
            CHECK(r.upper == std::ldexp(mid.upper, k));
            CHECK(r.naive_lower == std::ldexp(mid.naive_lower, k));
            CHECK(r.guard == mid.guard);
            CHECK(r.se > 0);
        }
    }
    TEST_CASE("bad input names the function and the argument") {
        const std::vector<double> y(20, 1.0);
        auto fp = [](std::span<const std::size_t>, std::span<const std::size_t> test) {
            return std::vector<double>(test.size(), 0.0);
        };
        CHECK_THROWS_WITH_AS(heldout::nested_cv_interval(fp, y, heldout::loss::squared{}, {.folds = 2}),
                             "heldout::nested_cv_interval: argument 'folds': need at least 3 folds (the inner CV has "
                             "K - 1), got 2",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(
            heldout::nested_cv_interval(fp, y, heldout::loss::squared{}, {.folds = 11}),
            "heldout::nested_cv_interval: argument 'truth': 20 rows cannot make 11 folds of at least 2 "
            "rows",
            heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::nested_cv_interval(fp, y, heldout::loss::squared{}, {.repeats = 0}),
                             "heldout::nested_cv_interval: argument 'repeats': need at least 1 repetition",
                             heldout::input_error);
        auto short_fp = [](std::span<const std::size_t>, std::span<const std::size_t> test) {
            return std::vector<double>(test.size() - 1, 0.0);
        };
        CHECK_THROWS_WITH_AS(
            heldout::nested_cv_interval(short_fp, y, heldout::loss::squared{}, {.folds = 4, .repeats = 1}),
            "heldout::nested_cv_interval: argument 'fit_predict result': size 4 differs from size 5 "
            "of 'test rows'",
            heldout::input_error);
        auto nan_fp = [](std::span<const std::size_t>, std::span<const std::size_t> test) {
            return std::vector<double>(test.size(), std::nan(""));
        };
        CHECK_THROWS_WITH_AS(
            heldout::nested_cv_interval(nan_fp, y, heldout::loss::squared{}, {.folds = 4, .repeats = 1}),
            "heldout::nested_cv_interval: argument 'fit_predict result': loss is not finite at index 0",
            heldout::input_error);
        const std::vector<nested_cv_cell> bad{{{1.0}, {1.0, 2.0}}, {{1.0, 2.0}, {1.0}}, {{1.0, 2.0}, {1.0}}};
        CHECK_THROWS_WITH_AS(heldout::nested_cv_interval_from_losses(bad, 3),
                             "heldout::nested_cv_interval_from_losses: argument 'cells': a fold needs at least 2 outer "
                             "losses at index 0",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::nested_cv_interval_from_losses(std::span<const nested_cv_cell>(bad).first(2), 3),
                        heldout::input_error);
    }
}
