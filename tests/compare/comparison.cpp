// Tests for heldout/compare/comparison.hpp (and the group umbrella heldout/compare.hpp):
// paired comparisons of two models from aggregators or from one test set's predictions.
#include <heldout/compare.hpp>
#include <heldout/compare/paired.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/five_by_two.hpp>
#include <heldout/plan/holdout.hpp>
#include <heldout/plan/leave_one_out.hpp>
#include <heldout/plan/purged_kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/subsampling.hpp>
#include <heldout/plan/walk_forward.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <sstream>
#include <vector>

namespace {
// A test measure whose value on a split is the mean of the predictions: feeding constant
// predictions d_j + 1 (model A) and 1 (model B) makes the split differences exactly d_j.
struct identity_loss {
    static constexpr std::string_view name = "identity";
    static constexpr std::string_view measure_name = "mean prediction";
    double value(double, double f) const { return f; }
};
using mean_prediction = heldout::measure::mean_loss<identity_loss>;

template <class Range>
std::pair<heldout::aggregator, heldout::aggregator> with_differences(Range&& splits, const std::vector<double>& d) {
    heldout::aggregator a(mean_prediction{}), b(mean_prediction{});
    std::size_t j = 0;
    for (const heldout::split& s : splits) {
        const std::vector<double> truth(s.test.size(), 0.0);
        a.record(s, truth, std::vector<double>(s.test.size(), d.at(j) + 1.0));
        b.record(s, truth, std::vector<double>(s.test.size(), 1.0));
        ++j;
    }
    REQUIRE(j == d.size());
    return {std::move(a), std::move(b)};
}

// Standard normals from heldout::rng by Box-Muller, so the simulation is the same everywhere.
struct normals {
    heldout::rng g;
    bool has = false;
    double spare = 0;
    double operator()() {
        if (has) {
            has = false;
            return spare;
        }
        const double u1 = 1.0 - g.uniform(), u2 = g.uniform();
        const double r = std::sqrt(-2.0 * std::log(u1)), a = 6.283185307179586 * u2;
        spare = r * std::sin(a);
        has = true;
        return r * std::cos(a);
    }
};

// y = x1 + x2 + e; model A fits y ~ x1, model B fits y ~ x2 by least squares: by symmetry the
// two have the same expected error, the null hypothesis of the comparison.
struct symmetric_problem {
    std::vector<double> x1, x2, y;
    explicit symmetric_problem(std::size_t n, normals& z) : x1(n), x2(n), y(n) {
        for (std::size_t i = 0; i < n; ++i) {
            x1[i] = z();
            x2[i] = z();
            y[i] = x1[i] + x2[i] + z();
        }
    }
    auto learner(const std::vector<double>& x) const {
        return [this, &x](std::span<const std::size_t> train, std::span<const std::size_t> test) {
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
            const double slope = sxy / sxx;
            std::vector<double> f;
            f.reserve(test.size());
            for (std::size_t r : test)
                f.push_back(my + slope * (x[r] - mx));
            return f;
        };
    }
};
} // namespace

TEST_SUITE("compare/comparison") {
    TEST_CASE("corrected resampled t over subsampling splits (Nadeau & Bengio 2003)") {
        // Check values: R 4.2.2 pt / t.test for the Nadeau-Bengio formula, J = 10, n1 = 90, n2 = 10:
        // corrected t = 2.50386697834, p = 0.0336476570611, 95% CI [0.00241336518303, 0.047586634817];
        // naive t = 3.63803437554, p = 0.00541743338826 (R t.test(d)), CI [0.00945481179339, 0.0405451882066].
        const std::vector<double> d{0.02, 0.05, -0.01, 0.03, 0.04, 0.00, 0.06, 0.02, 0.01, 0.03};
        auto [a, b] = with_differences(heldout::subsampling{.repeats = 10, .test_count = 10, .seed = 3}.splits(100), d);
        const auto c = heldout::compare(a, b, mean_prediction{});
        CHECK(c.method == heldout::paired::method_id::corrected_t); // the default for repeated splits
        CHECK(c.method_label == "corrected t (Nadeau-Bengio)");
        CHECK(heldout_test::close(c.difference, 0.025, 1e-12));
        CHECK(heldout_test::close(c.statistic, 2.50386697834, 1e-10));
        CHECK(*c.df == 9);
        CHECK(heldout_test::close(c.p_value, 0.0336476570611, 1e-9));
        CHECK(heldout_test::close(*c.lower, 0.00241336518303, 1e-9));
        CHECK(heldout_test::close(*c.upper, 0.047586634817, 1e-9));
        CHECK(c.splits == 10);
        CHECK(c.observations == 100);
        const auto n = heldout::compare(a, b, mean_prediction{}, heldout::paired::naive_t);
        CHECK(heldout_test::close(n.statistic, 3.63803437554, 1e-10));
        CHECK(heldout_test::close(n.p_value, 0.00541743338826, 1e-9));
        CHECK(heldout_test::close(*n.lower, 0.00945481179339, 1e-9));
        CHECK(heldout_test::close(*n.upper, 0.0405451882066, 1e-9));
    }
    TEST_CASE("repeated k-fold form (Bouckaert & Frank 2004)") {
        // Check values: R 4.2.2, r = 3, k = 5 (n2/n1 = 1/4): t = 2.65307013918, df 14, p = 0.0189153841296.
        const std::vector<double> d{0.03, 0.01, 0.04, 0.02, 0.00, 0.02, 0.05, 0.01,
                                    0.03, 0.02, 0.04, 0.00, 0.03, 0.01, 0.02};
        auto [a, b] = with_differences(heldout::repeated_kfold{.folds = 5, .repeats = 3, .seed = 1}.splits(100), d);
        const auto c = heldout::compare(a, b, mean_prediction{}, heldout::paired::corrected_t, 0.95);
        CHECK(c.method_label == "corrected t (Bouckaert-Frank)");
        CHECK(heldout_test::close(c.difference, 0.022, 1e-12));
        CHECK(heldout_test::close(c.statistic, 2.65307013918, 1e-10));
        CHECK(*c.df == 14);
        CHECK(heldout_test::close(c.p_value, 0.0189153841296, 1e-9));
        // B - A is the mirror image.
        const auto m = heldout::compare(b, a, mean_prediction{});
        CHECK(m.statistic == doctest::Approx(-c.statistic).epsilon(1e-12));
        CHECK(m.p_value == doctest::Approx(c.p_value).epsilon(1e-12));
    }
    TEST_CASE("5x2cv t and F on the splits of heldout::five_by_two") {
        // Check values: R pt / pf (Dietterich 1998; Alpaydin 1999) for these differences.
        const std::vector<double> d{0.05, 0.03, 0.02, 0.04, 0.06, 0.01, 0.03, 0.03, 0.04, 0.00};
        auto [a, b] = with_differences(heldout::five_by_two{.seed = 2}.splits(60), d);
        const auto t = heldout::compare(a, b, mean_prediction{}, heldout::paired::five_by_two_t);
        CHECK(heldout_test::close(t.statistic, 2.25876975726, 1e-10));
        CHECK(heldout_test::close(t.p_value, 0.0734648602265, 1e-9));
        CHECK(*t.df == 5);
        CHECK(heldout_test::close(t.difference, 0.031, 1e-12)); // mean of the ten
        const auto f = heldout::compare(a, b, mean_prediction{}, heldout::paired::five_by_two_f);
        CHECK(heldout_test::close(f.statistic, 2.55102040816, 1e-10));
        CHECK(heldout_test::close(f.p_value, 0.156502522885, 1e-9));
        CHECK(*f.df == 10);
        CHECK(*f.df2 == 5);
        CHECK_FALSE(f.has_interval());
        // 5x2cv on other splits is refused.
        auto [c, e] = with_differences(heldout::repeated_kfold{.folds = 5, .repeats = 2, .seed = 1}.splits(60), d);
        CHECK_THROWS_WITH_AS(
            heldout::compare(c, e, mean_prediction{}, heldout::paired::five_by_two_t),
            "heldout::compare: argument 'method': paired::five_by_two_t (5x2cv t (Dietterich)) does not "
            "apply to measure mean prediction: it needs the 10 splits of heldout::five_by_two (5 repeats of "
            "2-fold, in order). Methods that apply here: paired::corrected_t (the default here), "
            "paired::naive_t",
            heldout::input_error);
    }
    TEST_CASE("paired::automatic per plan kind: corrected t only on random splits") {
        // Differences d_j on each plan's splits; the design comes from the plan itself.
        auto diffs = [](std::size_t k) {
            std::vector<double> d(k);
            for (std::size_t j = 0; j < k; ++j)
                d[j] = 0.1 * static_cast<double>(j % 3) - 0.05;
            return d;
        };
        const std::size_t n = 24;
        {
            auto r = heldout::repeated_kfold{.folds = 4, .repeats = 2, .seed = 5}.splits(n);
            auto [a, b] = with_differences(r, diffs(r.size()));
            CHECK(heldout::compare(a, b, mean_prediction{}).method == heldout::paired::method_id::corrected_t);
        }
        auto refuses = [&](const heldout::aggregator& a, const heldout::aggregator& b, heldout::split_design d,
                           std::string_view words) {
            CAPTURE(words);
            try {
                (void)heldout::compare(a, b, mean_prediction{});
                FAIL("paired::automatic did not refuse");
            } catch (const heldout::input_error& e) {
                const std::string what = e.what();
                CHECK(what.find("no paired method has a valid default for " + std::string(words)) != std::string::npos);
                CHECK(what.find(std::string(heldout::rule_for(d).why)) != std::string::npos);
                CHECK(what.find("paired::naive_t") != std::string::npos);
            }
            CHECK_THROWS_AS((void)heldout::compare(a, b, mean_prediction{}, heldout::paired::corrected_t),
                            heldout::input_error);
        };
        {
            auto r = heldout::leave_one_out{}.splits(n);
            auto [a, b] = with_differences(r, diffs(r.size()));
            refuses(a, b, heldout::split_design::leave_one_out, "leave-one-out");
        }
        {
            auto r = heldout::walk_forward{.initial = 8, .horizon = 4, .step = 4}.splits(n);
            auto [a, b] = with_differences(r, diffs(r.size()));
            refuses(a, b, heldout::split_design::time_ordered, "time-ordered splits");
        }
        {
            std::vector<int> t0(n), t1(n);
            for (std::size_t i = 0; i < n; ++i) {
                t0[i] = static_cast<int>(i);
                t1[i] = static_cast<int>(i) + 2;
            }
            auto r = heldout::purged_kfold{.folds = 4}.splits(heldout::intervals(t0, t1));
            auto [a, b] = with_differences(r, diffs(r.size()));
            refuses(a, b, heldout::split_design::purged, "purged k-fold");
        }
    }
    TEST_CASE("different splits are refused, naming the first mismatch") {
        const std::vector<double> d(10, 0.0);
        auto [a, b] = with_differences(heldout::subsampling{.repeats = 10, .test_count = 10, .seed = 3}.splits(100), d);
        auto [c, e] = with_differences(heldout::subsampling{.repeats = 10, .test_count = 10, .seed = 4}.splits(100), d);
        try {
            (void)heldout::compare(a, e, mean_prediction{});
            FAIL("expected input_error");
        } catch (const heldout::input_error& x) {
            const std::string s = x.what();
            CHECK(s.rfind("heldout::compare: argument 'agg_b': split 0 (repeat 0, fold 0) differs from agg_a's: test "
                          "row ",
                          0) == 0);
        }
        auto [f, g] = with_differences(heldout::subsampling{.repeats = 3, .test_count = 10, .seed = 3}.splits(100),
                                       std::vector<double>(3, 0.0));
        CHECK_THROWS_WITH_AS(heldout::compare(a, g, mean_prediction{}),
                             "heldout::compare: argument 'agg_b': 3 splits recorded, agg_a has 10: the models must be "
                             "evaluated on the same splits",
                             heldout::input_error);
        // All differences equal: the corrected t is undefined (zero variance).
        CHECK_THROWS_AS(heldout::compare(a, b, mean_prediction{}), heldout::undefined_error);
    }
    TEST_CASE("one test set: McNemar from the per-row losses equals mcnemar_test on the labels") {
        std::mt19937_64 gen(5); // test data only
        std::uniform_int_distribution<int> cls(0, 2);
        std::uniform_real_distribution<double> u;
        const std::size_t n = 300;
        std::vector<int> y(n), pa(n), pb(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = cls(gen);
            pa[i] = u(gen) < 0.8 ? y[i] : cls(gen);
            pb[i] = u(gen) < 0.7 ? y[i] : cls(gen);
        }
        auto fit_a = [&](std::span<const std::size_t>, std::span<const std::size_t> test) {
            std::vector<int> f;
            for (std::size_t r : test)
                f.push_back(pa[r]);
            return f;
        };
        auto fit_b = [&](std::span<const std::size_t>, std::span<const std::size_t> test) {
            std::vector<int> f;
            for (std::size_t r : test)
                f.push_back(pb[r]);
            return f;
        };
        const auto plan = heldout::holdout{.test_fraction = 0.5, .seed = 9};
        const heldout::measure::classification_error err{};
        const heldout::measure::accuracy acc{};
        const auto a = heldout::evaluate_splits(plan.splits(n), y, fit_a, err, acc);
        const auto b = heldout::evaluate_splits(plan.splits(n), y, fit_b, err, acc);
        const auto c = heldout::compare(a, b, err); // automatic: McNemar mid-p on one split
        CHECK(c.method == heldout::paired::method_id::mcnemar_mid_p);
        // Brute force: the same test rows, labels compared directly.
        const auto rows = a.test_rows(0);
        std::vector<int> ty, ta, tb;
        for (std::size_t r : rows) {
            ty.push_back(y[r]);
            ta.push_back(pa[r]);
            tb.push_back(pb[r]);
        }
        for (auto [m, v] : {std::pair{heldout::paired::mcnemar_exact, heldout::mcnemar::exact},
                            std::pair{heldout::paired::mcnemar_mid_p, heldout::mcnemar::mid_p},
                            std::pair{heldout::paired::mcnemar_chi_squared, heldout::mcnemar::chi_squared},
                            std::pair{heldout::paired::mcnemar_corrected, heldout::mcnemar::corrected}}) {
            const auto want = heldout::mcnemar_test(ty, ta, tb, v);
            const auto got = heldout::compare(a, b, err, m);
            CHECK(got.p_value == want.p_value);
            CHECK(got.statistic == want.statistic);
            CHECK(heldout::compare(a, b, acc, m).p_value == want.p_value); // accuracy: 1 = right
            const auto direct = heldout::compare(err, ty, ta, tb, m);      // from the predictions
            CHECK(direct.p_value == want.p_value);
            CHECK(direct.difference == doctest::Approx(c.difference).epsilon(1e-14));
        }
        CHECK_FALSE(c.has_interval());
        CHECK(c.difference == doctest::Approx(heldout::evaluate(err, ty, ta) - heldout::evaluate(err, ty, tb)));
        // A split method on one test set is refused.
        CHECK_THROWS_WITH_AS(
            heldout::compare(a, b, err, heldout::paired::corrected_t),
            "heldout::compare: argument 'method': paired::corrected_t (corrected t) does not apply to "
            "measure classification error: it works over several splits, and one test set was recorded. "
            "Methods that apply here: paired::mcnemar_exact, paired::mcnemar_mid_p (the default here), "
            "paired::mcnemar_chi_squared, paired::mcnemar_corrected, paired::bootstrap_percentile, "
            "paired::bootstrap_bca",
            heldout::input_error);
    }
    TEST_CASE("one test set: paired DeLong and paired bootstrap from the predictions") {
        std::mt19937_64 gen(11); // test data only
        std::normal_distribution<double> z;
        const std::size_t n = 200;
        std::vector<int> y(n);
        std::vector<double> sa(n), sb(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = i % 3 == 0 ? 1 : 0;
            sa[i] = y[i] + z(gen);
            sb[i] = 0.6 * y[i] + z(gen);
        }
        const heldout::measure::auc auc{};
        const auto d = heldout::compare(auc, y, sa, sb); // automatic: DeLong for an AUC
        const auto want = heldout::delong_test(y, sa, sb, 0.95);
        // compare() runs the generic DeLong test on the measure's structural components
        // (cap::case_components); delong_test is the fast two-sort route of the same formulas, so
        // the two agree to rounding of the variance sums.
        CHECK(d.method == heldout::paired::method_id::delong);
        CHECK(d.difference == want.difference);
        CHECK(heldout_test::close(d.statistic, want.z, 1e-12));
        CHECK(heldout_test::close(d.p_value, want.p_value, 1e-11));
        CHECK(heldout_test::close(*d.lower, want.lower, 1e-12));
        CHECK(heldout_test::close(*d.upper, want.upper, 1e-12));
        // From two aggregators that recorded the same one test set: the same paired DeLong test.
        std::vector<std::size_t> rows(n), none;
        for (std::size_t i = 0; i < n; ++i)
            rows[i] = i;
        const heldout::split whole{none, rows};
        heldout::aggregator agg_a(auc), agg_b(auc);
        agg_a.record(whole, y, sa);
        agg_b.record(whole, y, sb);
        const auto from_aggs = heldout::compare(agg_a, agg_b, auc);
        CHECK(from_aggs.method == heldout::paired::method_id::delong);
        CHECK(from_aggs.difference == want.difference);
        CHECK(from_aggs.p_value == d.p_value); // the same route as compare() on the predictions
        CHECK(*from_aggs.lower == *d.lower);
        // The paired bootstrap is the intervals' paired bootstrap: same seed, same interval.
        const auto b = heldout::compare(auc, y, sa, sb, heldout::paired::bootstrap_percentile(500, 3));
        const auto r = heldout::paired_bootstrap_percentile(auc, y, sa, sb, {.replicates = 500, .seed = 3});
        CHECK(*b.lower == r.lower);
        CHECK(*b.upper == r.upper);
        CHECK(b.difference == doctest::Approx(want.difference).epsilon(1e-14));
        // Monte-Carlo p from the same replicates: brute force count.
        const auto reps = heldout::paired_bootstrap_replicates(auc, y, sa, sb, {.replicates = 500, .seed = 3});
        std::size_t le = 0, ge = 0;
        for (double x : reps.values) {
            le += x <= 0;
            ge += x >= 0;
        }
        CHECK(b.p_value == doctest::Approx(std::min(1.0, 2.0 * (1.0 + static_cast<double>(std::min(le, ge))) / 501)));
        CHECK(b.p_value > 0);
        const auto bca = heldout::compare(auc, y, sa, sb, heldout::paired::bootstrap_bca(500, 3));
        const auto rb = heldout::paired_bootstrap_bca(auc, y, sa, sb, {.replicates = 500, .seed = 3});
        CHECK(*bca.lower == doctest::Approx(rb.lower).epsilon(1e-12));
        CHECK(*bca.upper == doctest::Approx(rb.upper).epsilon(1e-12));
        CHECK_THROWS_WITH_AS(
            heldout::compare(auc, y, sa, sb, heldout::paired::mcnemar_exact),
            "heldout::compare: argument 'method': paired::mcnemar_exact (McNemar exact) does not apply to "
            "measure AUC: the measure is not a mean of per-row values (it does not offer cap::row_losses). "
            "Methods that apply here: paired::delong (the default here), paired::bootstrap_percentile, "
            "paired::bootstrap_bca",
            heldout::input_error);
    }
    TEST_CASE("one test set from aggregators: the bootstrap of a pointwise measure reads the per-row losses") {
        std::mt19937_64 gen(17); // test data only
        std::normal_distribution<double> z;
        const std::size_t n = 120;
        std::vector<double> y(n), fa(n), fb(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = z(gen);
            fa[i] = y[i] + 0.5 * z(gen);
            fb[i] = y[i] + 0.7 * z(gen);
        }
        auto give = [](const std::vector<double>& f) {
            return [&f](std::span<const std::size_t>, std::span<const std::size_t> test) {
                std::vector<double> out;
                for (std::size_t r : test)
                    out.push_back(f[r]);
                return out;
            };
        };
        const auto plan = heldout::holdout{.test_count = 60, .seed = 1};
        const heldout::measure::mse mse{};
        const auto a = heldout::evaluate_splits(plan.splits(n), y, give(fa), mse);
        const auto b = heldout::evaluate_splits(plan.splits(n), y, give(fb), mse);
        const auto c = heldout::compare(a, b, mse, heldout::paired::bootstrap_percentile(400, 5));
        std::vector<double> ty, ta, tb;
        for (std::size_t r : a.test_rows(0)) {
            ty.push_back(y[r]);
            ta.push_back(fa[r]);
            tb.push_back(fb[r]);
        }
        const auto r = heldout::paired_bootstrap_percentile(mse, ty, ta, tb, {.replicates = 400, .seed = 5});
        CHECK(heldout_test::close(*c.lower, r.lower, 1e-12)); // the same resamples, the same rows
        CHECK(heldout_test::close(*c.upper, r.upper, 1e-12));
        const auto cb = heldout::compare(a, b, mse, heldout::paired::bootstrap_bca(400, 5));
        const auto rb = heldout::paired_bootstrap_bca(mse, ty, ta, tb, {.replicates = 400, .seed = 5});
        CHECK(heldout_test::close(*cb.lower, rb.lower, 1e-12));
        CHECK(heldout_test::close(*cb.upper, rb.upper, 1e-12));
        CHECK(heldout::compare(a, b, mse).method == heldout::paired::method_id::bootstrap_percentile);
        CHECK_THROWS_WITH_AS(
            heldout::compare(a, b, mse, heldout::paired::delong),
            "heldout::compare: argument 'method': paired::delong (paired DeLong) does not apply to measure "
            "MSE: the measure has no DeLong components (it is not a two-sample U statistic like the ROC "
            "AUC). Methods that apply here: paired::bootstrap_percentile (the default here), "
            "paired::bootstrap_bca",
            heldout::input_error);
    }
    TEST_CASE("printing, CSV and JSON") {
        const std::vector<double> d{0.02, 0.05, -0.01, 0.03, 0.04, 0.00, 0.06, 0.02, 0.01, 0.03};
        auto [a, b] = with_differences(heldout::subsampling{.repeats = 10, .test_count = 10, .seed = 3}.splits(100), d);
        auto c = heldout::compare(a, b, mean_prediction{});
        std::ostringstream os;
        os << c;
        CHECK(os.str() == "mean prediction A - B = 0.025 [0.002413, 0.04759] 95%, corrected t (Nadeau-Bengio) 2.504, "
                          "df 9, p = 0.03365; 10 splits, n=100");
        const std::vector<heldout::comparison> cs{c};
        std::ostringstream csv;
        heldout::write_csv(csv, cs);
        const std::string s = csv.str();
        CHECK(s.rfind(std::string(heldout::comparison_csv_header) + "\nmean prediction,A,B,corrected_t,0.95,", 0) == 0);
        std::ostringstream js;
        heldout::write_json(js, cs);
        CHECK(js.str().rfind("[{\"measure\":\"mean prediction\",\"model_a\":\"A\",\"model_b\":\"B\",\"method\":"
                             "\"corrected_t\",",
                             0) == 0);
        CHECK(js.str().find("\"df2\":null") != std::string::npos);
    }
    TEST_CASE("several models: all pairs and against a reference, Holm-adjusted") {
        const auto splits = heldout::subsampling{.repeats = 10, .test_count = 10, .seed = 3};
        std::vector<heldout::aggregator> models;
        const std::vector<std::vector<double>> shifts{{0.00, 0.01, 0.02, 0.00, 0.01, 0.03, 0.02, 0.00, 0.01, 0.02},
                                                      {0.03, 0.05, 0.02, 0.04, 0.06, 0.03, 0.05, 0.04, 0.03, 0.05},
                                                      {0.01, 0.00, 0.02, 0.01, 0.00, 0.02, 0.03, 0.01, 0.02, 0.00}};
        for (const auto& s : shifts)
            models.push_back(with_differences(splits.splits(100), s).first);
        const auto all =
            heldout::compare_all_pairs(models, mean_prediction{}, heldout::paired::automatic, 0.95, {"x", "y", "z"});
        REQUIRE(all.size() == 3);
        CHECK(all[0].model_a == "x");
        CHECK(all[0].model_b == "y");
        CHECK(all[2].model_a == "y");
        CHECK(all[2].model_b == "z");
        const auto adj = heldout::holm_adjust(std::vector<double>{all[0].p_value, all[1].p_value, all[2].p_value});
        for (std::size_t i = 0; i < 3; ++i)
            CHECK(*all[i].adjusted_p_value == adj[i]);
        const auto ref = heldout::compare_to_reference(models, 1, mean_prediction{});
        REQUIRE(ref.size() == 2);
        CHECK(ref[0].model_a == "model 1");
        CHECK(ref[0].model_b == "model 2");
        CHECK(ref[0].statistic == doctest::Approx(all[0].statistic));
        CHECK_THROWS_WITH_AS(heldout::compare_to_reference(models, 3, mean_prediction{}),
                             "heldout::compare: argument 'reference': index 3 outside the 3 models",
                             heldout::input_error);
    }
    TEST_CASE("simulation: two equally good learners under 10 x 10-fold CV") {
        // A tiny learner is run (not a model of correlated folds): y = x1 + x2 + e, A regresses y on
        // x1, B on x2, so both have the same expected error. Over 150 data sets of 60 rows, 10 x
        // 10-fold CV, a test at alpha = 0.05 should reject about 5% of the time. Nadeau & Bengio
        // (2003) and Bouckaert & Frank (2004) report the naive paired t far above that and the
        // corrected t near it. Bands are wide (fixed seed; the Monte-Carlo SE at 5% is 0.018).
        normals z{heldout::rng(20261206)};
        const heldout::measure::mse mse{};
        int reject_corrected = 0, reject_naive = 0;
        const int reps = 150;
        for (int r = 0; r < reps; ++r) {
            const symmetric_problem p(60, z);
            const auto plan =
                heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = static_cast<std::uint64_t>(r)};
            const auto a = heldout::evaluate_splits(plan.splits(60), p.y, p.learner(p.x1), mse);
            const auto b = heldout::evaluate_splits(plan.splits(60), p.y, p.learner(p.x2), mse);
            reject_corrected += heldout::compare(a, b, mse).p_value < 0.05;
            reject_naive += heldout::compare(a, b, mse, heldout::paired::naive_t).p_value < 0.05;
        }
        const double rc = reject_corrected / static_cast<double>(reps), rn = reject_naive / static_cast<double>(reps);
        MESSAGE("rejection rate: corrected " << rc << ", naive " << rn);
        CHECK(rc <= 0.12);
        CHECK(rn >= 0.20);
        CHECK(rn - rc >= 0.12);
    }
}
