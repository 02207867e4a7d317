// Tests for heldout/estimate/bootstrap.hpp: percentile and BCa intervals, paired form,
// the documented resampling, the jackknife, and the lower-level interval formulas.
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/measure/mean_loss.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <random>
#include <string_view>
#include <vector>

namespace {
// loss(y, f) = y - f: with f = 0, mean_loss<identity> is the plain mean of y.
struct identity {
    static constexpr std::string_view name = "identity";
    double value(double y, double f) const { return y - f; }
};
using mean_of = heldout::measure::mean_loss<identity>;

// A measure whose accumulator keeps every value (growing state): exercises the O(n^2) jackknife.
struct kept_mean_acc {
    std::vector<double> v;
    std::vector<double> w;
    template <class T, class P>
    void add(const T& t, const P& p) {
        auto ts = heldout::values_of(t);
        auto ps = heldout::values_of(p);
        for (std::size_t i = 0; i < ts.size(); ++i) {
            v.push_back(static_cast<double>(ts[i]) - static_cast<double>(ps[i]));
            w.push_back(1.0);
        }
    }
    template <class T, class P, class W>
    void add(const T& t, const P& p, const W& ww) {
        auto ts = heldout::values_of(t);
        auto ps = heldout::values_of(p);
        auto ws = heldout::values_of(ww);
        for (std::size_t i = 0; i < ts.size(); ++i) {
            v.push_back(static_cast<double>(ts[i]) - static_cast<double>(ps[i]));
            w.push_back(static_cast<double>(ws[i]));
        }
    }
    void merge(const kept_mean_acc& o) {
        v.insert(v.end(), o.v.begin(), o.v.end());
        w.insert(w.end(), o.w.begin(), o.w.end());
    }
    double value() const {
        double s = 0, sw = 0;
        for (std::size_t i = 0; i < v.size(); ++i) {
            s += w[i] * v[i];
            sw += w[i];
        }
        if (!(sw > 0))
            heldout::detail::fail_undefined("kept mean", "no weight");
        return s / sw;
    }
    void reset() {
        v.clear();
        w.clear();
    }
    template <class F>
    void visit_state(F&& f) const {
        f(v);
        f(w);
    }
};
struct kept_mean {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    static constexpr heldout::prediction_kind kind = heldout::prediction_kind::real;
    std::string name() const { return "kept mean"; }
    kept_mean_acc accumulator() const { return {}; }
};

// Mean of y over rows with f > 0 (a fixed-state accumulator that can be undefined).
struct only_flagged_acc {
    double s = 0, w = 0;
    template <class T, class P>
    void add(const T& t, const P& p) {
        add(t, p, std::vector<double>(heldout::values_of(t).size(), 1.0));
    }
    template <class T, class P, class W>
    void add(const T& t, const P& p, const W& ww) {
        auto ts = heldout::values_of(t);
        auto ps = heldout::values_of(p);
        auto ws = heldout::values_of(ww);
        for (std::size_t i = 0; i < ts.size(); ++i)
            if (ps[i] > 0) {
                s += static_cast<double>(ws[i]) * ts[i];
                w += static_cast<double>(ws[i]);
            }
    }
    void merge(const only_flagged_acc& o) {
        s += o.s;
        w += o.w;
    }
    double value() const {
        if (!(w > 0))
            heldout::detail::fail_undefined("only flagged", "no flagged row");
        return s / w;
    }
    void reset() { s = w = 0; }
    template <class F>
    void visit_state(F&& f) const {
        f(s);
        f(w);
    }
};
struct only_flagged {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    static constexpr heldout::prediction_kind kind = heldout::prediction_kind::real;
    std::string name() const { return "only flagged"; }
    only_flagged_acc accumulator() const { return {}; }
};
} // namespace

TEST_SUITE("estimate/bootstrap") {
    TEST_CASE("Efron 1987, worked by hand: fixed 20 replicates, jackknife of the mean, 90% BCa") {
        // Data and replicates from Efron 1987, worked by hand (Efron 1987 BCa formulas; [SELF] there with
        // scipy special.ndtri/ndtr and numpy percentile type 7).
        const std::vector<double> x{2.1, 3.4, 1.9, 5.6, 4.2, 3.3, 7.8, 2.8, 4.9, 3.0};
        const std::vector<double> reps{3.67, 3.32, 4.40, 3.96, 3.36, 3.08, 4.05, 3.77, 4.04, 3.62,
                                       4.81, 3.88, 3.39, 3.72, 3.73, 4.33, 3.41, 3.86, 3.85, 3.44};
        const std::vector<double> zero(x.size(), 0.0);
        const auto jack = heldout::jackknife_values(mean_of{}, x, zero);
        CHECK(heldout_test::close(jack[0], 4.1, 1e-14)); // (39 - 2.1)/9
        CHECK(heldout_test::close(jack[6], 3.466666666666667, 1e-14));
        const double a = heldout::jackknife_acceleration(jack);
        CHECK(heldout_test::close(a, 0.0521593049493, 1e-11)); // Efron 1987, worked by hand
        // identity (Efron & Tibshirani 1993, worked by hand): a = skewness / (6 sqrt(n)) with population moments for
        // the mean
        double m2 = 0, m3 = 0;
        for (double v : x) {
            m2 += (v - 3.9) * (v - 3.9) / 10;
            m3 += (v - 3.9) * (v - 3.9) * (v - 3.9) / 10;
        }
        CHECK(heldout_test::close(a, m3 / std::pow(m2, 1.5) / (6 * std::sqrt(10.0)), 1e-12));
        const auto b = heldout::bca_interval(3.9, reps, jack, 0.90);
        CHECK(heldout_test::close(b.z0, 0.524400512708, 1e-11)); // Phi^-1(0.7), Efron 1987, worked by hand
        CHECK(heldout_test::close(b.lower_probability, 0.29660622134, 1e-10));
        CHECK(heldout_test::close(b.upper_probability, 0.998513002448, 1e-11));
        CHECK(heldout_test::close(b.lower, 3.55439327698, 1e-11));
        CHECK(heldout_test::close(b.upper, 4.79841628907, 1e-11));
        CHECK(b.method == heldout::bootstrap_method::bca);
        const auto p = heldout::percentile_interval(3.9, reps, 0.90);
        CHECK(heldout_test::close(p.lower, 3.308, 1e-14)); // numpy percentile type 7
        CHECK(heldout_test::close(p.upper, 4.4205, 1e-14));
    }
    TEST_CASE("live reference: scipy.stats._resampling._bca_interval on fixed replicates, with ties") {
        heldout_test::reference_table ref("ref_intervals");
        for (const char* name : {"bca.methods12", "bca.random", "bca.tied"}) {
            const std::string k = std::string(name) + ".";
            CAPTURE(name);
            const auto& x = ref.get(k + "x");
            const auto& reps = ref.get(k + "reps");
            const double lev = ref.scalar(k + "level");
            const double theta = ref.scalar(k + "theta");
            const std::vector<double> zero(x.size(), 0.0);
            const auto jack = heldout::jackknife_values(mean_of{}, x, zero);
            const auto& rj = ref.get(k + "jack");
            for (std::size_t i = 0; i < jack.size(); ++i)
                CHECK(heldout_test::close(jack[i], rj[i], 1e-13)); // numpy leave-one-out means
            const auto& al = ref.get(k + "alphas");
            const auto b = heldout::bca_interval(theta, reps, jack, lev);
            CHECK(heldout_test::close(b.lower_probability, al[0], 1e-12));     // scipy alpha_1
            CHECK(heldout_test::close(b.upper_probability, al[1], 1e-12));     // scipy alpha_2
            CHECK(heldout_test::close(b.acceleration, al[2], 1e-12));          // scipy a_hat
            CHECK(heldout_test::close(b.lower, ref.get(k + "bca")[0], 1e-12)); // np.percentile(alpha_1)
            CHECK(heldout_test::close(b.upper, ref.get(k + "bca")[1], 1e-12));
            const auto p = heldout::percentile_interval(theta, reps, lev);
            CHECK(heldout_test::close(p.lower, ref.get(k + "pct")[0], 1e-12)); // np.percentile type 7
            CHECK(heldout_test::close(p.upper, ref.get(k + "pct")[1], 1e-12));
        }
        // The tied case really has replicates equal to theta, counted one half (scipy's rule).
        const auto c = ref.get("bca.tied.counts");
        REQUIRE(c[1] > 20);
        const auto& reps = ref.get("bca.tied.reps");
        const double z0 = heldout::detail::normal_quantile((c[0] + 0.5 * c[1]) / static_cast<double>(reps.size()));
        const auto& x = ref.get("bca.tied.x");
        const auto jack = heldout::jackknife_values(mean_of{}, x, std::vector<double>(x.size(), 0.0));
        CHECK(heldout_test::close(heldout::bca_interval(0.3, reps, jack, 0.95).z0, z0, 1e-14));
    }
    TEST_CASE("ties at the estimate: replicates equal to theta up to rounding count one half") {
        // theta = 0.3; 0.1 + 0.2 = 0.30000000000000004 is a rounding tie and must count as equal.
        const std::vector<double> reps{0.1, 0.2, 0.1 + 0.2, 0.3, 0.4, 0.5};
        const std::vector<double> jack{0.25, 0.3, 0.35, 0.3, 0.4};
        const auto b = heldout::bca_interval(0.3, reps, jack, 0.9);
        // (#less = 2 + 0.5 * #equal = 2) / 6 = 0.5, so z0 = 0.
        CHECK(b.z0 == doctest::Approx(0.0).epsilon(1e-15));
    }
    TEST_CASE("undefined BCa: all replicates on one side, equal jackknife values, adjustment breakdown") {
        const std::vector<double> above{1.1, 1.2, 1.3};
        const std::vector<double> jack{0.9, 1.0, 1.1};
        CHECK_THROWS_WITH_AS(heldout::bca_interval(1.0, above, jack),
                             "heldout::bca_interval: undefined: every bootstrap replicate lies on one side of the "
                             "estimate: the BCa bias correction is infinite",
                             heldout::undefined_error);
        const std::vector<double> tied_all{1.0, 1.0, 1.0}; // all tied: (0 + 1.5)/3 = 0.5, defined
        CHECK_NOTHROW((void)heldout::bca_interval(1.0, tied_all, jack));
        const std::vector<double> reps{0.9, 1.0, 1.1, 1.2};
        const std::vector<double> flat{2.0, 2.0, 2.0};
        CHECK_THROWS_WITH_AS(heldout::bca_interval(1.0, reps, flat),
                             "heldout::bca_interval: undefined: all jackknife values are equal: the BCa acceleration "
                             "is 0/0",
                             heldout::undefined_error);
        // 1 - a (z0 + z) <= 0: one far jackknife value gives a = 0.1405 (the largest a for n = 10 is
        // about 1/6), 19 of 20 replicates below theta give z0 = Phi^-1(0.95) = 1.645, and a level of
        // 1 - 1e-10 gives z = 6.47, so a (z0 + z) = 1.14 > 1.
        const std::vector<double> skew{0, 0, 0, 0, 0, 0, 0, 0, 0, -100};
        CHECK(heldout_test::close(heldout::jackknife_acceleration(skew), 720000 / (6 * std::pow(9000.0, 1.5)), 1e-14));
        std::vector<double> below;
        for (int i = 0; i < 19; ++i)
            below.push_back(0.5 + 0.025 * i);
        below.push_back(1.5);
        CHECK_NOTHROW((void)heldout::bca_interval(1.0, below, skew, 0.95));
        try {
            (void)heldout::bca_interval(1.0, below, skew, 1 - 1e-10);
            FAIL("no undefined_error");
        } catch (const heldout::undefined_error& e) {
            CHECK(std::string(e.what()).rfind("heldout::bca_interval: undefined: 1 - a (z0 + z) <= 0: the BCa "
                                              "adjustment breaks down (acceleration 0.1405",
                                              0) == 0);
        }
        // constant data on a measure: the jackknife is flat -> undefined
        const std::vector<double> c{1, 1, 1, 1}, z{0, 0, 0, 0};
        CHECK_THROWS_AS(heldout::bootstrap_bca(mean_of{}, c, z, {.replicates = 50}), heldout::undefined_error);
    }
    TEST_CASE("the documented resampling: n draws of rng(seed, b).below(n)") {
        std::vector<std::uint32_t> counts(7);
        heldout::bootstrap_counts(counts, 42, 3);
        std::vector<std::uint32_t> expect(7, 0);
        heldout::rng g(42, 3);
        for (int i = 0; i < 7; ++i)
            ++expect[g.below(7)];
        CHECK(counts == expect);
        std::uint32_t total = 0;
        for (auto c : counts)
            total += c;
        CHECK(total == 7);
    }
    TEST_CASE("replicates equal the measure on the explicitly resampled rows (brute force, self-written)") {
        std::mt19937_64 gen(5); // test data only
        std::normal_distribution<double> d;
        const std::size_t n = 57;
        std::vector<double> y(n), f(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = d(gen);
            f[i] = y[i] + 0.5 * d(gen);
        }
        const heldout::bootstrap_options o{.replicates = 40, .seed = 9, .level = 0.9};
        const auto set = heldout::bootstrap_replicates(heldout::measure::mse{}, y, f, o);
        REQUIRE(set.values.size() == 40);
        CHECK(set.undefined == 0);
        for (std::size_t b = 0; b < 40; ++b) {
            heldout::rng g(9, b);
            std::vector<double> ry, rf;
            for (std::size_t i = 0; i < n; ++i) {
                const auto r = g.below(n);
                ry.push_back(y[r]);
                rf.push_back(f[r]);
            }
            CHECK(heldout_test::close(set.values[b], heldout::evaluate(heldout::measure::mse{}, ry, rf), 1e-13));
        }
        const auto p = heldout::bootstrap_percentile(heldout::measure::mse{}, y, f, o);
        const auto q = heldout::percentile_interval(heldout::evaluate(heldout::measure::mse{}, y, f), set.values, 0.9);
        CHECK(p.lower == q.lower);
        CHECK(p.upper == q.upper);
        CHECK(p.estimate == q.estimate);
        // deterministic: the same seed gives the same interval
        const auto p2 = heldout::bootstrap_percentile(heldout::measure::mse{}, y, f, o);
        CHECK(p2.lower == p.lower);
        // BCa through the measure = bca_interval on the same replicates and the jackknife
        const auto b = heldout::bootstrap_bca(heldout::measure::mse{}, y, f, o);
        const auto j = heldout::jackknife_values(heldout::measure::mse{}, y, f);
        const auto b2 = heldout::bca_interval(p.estimate, set.values, j, 0.9);
        CHECK(b.lower == b2.lower);
        CHECK(b.upper == b2.upper);
    }
    TEST_CASE("jackknife: the blocked O(n) route equals the direct leave-one-out (brute force)") {
        std::mt19937_64 gen(11);
        std::uniform_real_distribution<double> u(0, 3);
        for (std::size_t n : {2u, 3u, 10u, 17u, 101u}) {
            std::vector<double> y(n), f(n, 0.0);
            for (auto& v : y)
                v = u(gen);
            const auto fast = heldout::jackknife_values(mean_of{}, y, f);   // fixed state: blocked merges
            const auto slow = heldout::jackknife_values(kept_mean{}, y, f); // growing state: direct route
            for (std::size_t i = 0; i < n; ++i) {
                double s = 0;
                for (std::size_t j = 0; j < n; ++j)
                    if (j != i)
                        s += y[j];
                CHECK(heldout_test::close(fast[i], s / static_cast<double>(n - 1), 1e-13));
                CHECK(heldout_test::close(slow[i], s / static_cast<double>(n - 1), 1e-13));
            }
        }
    }
    TEST_CASE("paired: same resamples for both models; interval of value(a) - value(b)") {
        std::mt19937_64 gen(3);
        std::normal_distribution<double> d;
        const std::size_t n = 80;
        std::vector<double> y(n), fa(n), fb(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = d(gen);
            fa[i] = y[i] + 0.3 * d(gen);
            fb[i] = y[i] + 0.6 * d(gen);
        }
        const heldout::bootstrap_options o{.replicates = 200, .seed = 1, .level = 0.95};
        const heldout::measure::mse m;
        const auto pa = heldout::bootstrap_replicates(m, y, fa, o);
        const auto pb = heldout::bootstrap_replicates(m, y, fb, o);
        const auto pd = heldout::paired_bootstrap_replicates(m, y, fa, fb, o);
        for (std::size_t b = 0; b < 200; ++b)
            CHECK(pd.values[b] == pa.values[b] - pb.values[b]);
        const auto r = heldout::paired_bootstrap_percentile(m, y, fa, fb, o);
        CHECK(r.estimate == doctest::Approx(heldout::evaluate(m, y, fa) - heldout::evaluate(m, y, fb)));
        CHECK(r.upper < 0); // model a is clearly better (noise 0.3 vs 0.6): the difference is negative
        const auto bc = heldout::paired_bootstrap_bca(m, y, fa, fb, o);
        CHECK(bc.lower < bc.estimate);
        CHECK(bc.upper > bc.estimate);
        const auto ja = heldout::jackknife_values(m, y, fa), jb = heldout::jackknife_values(m, y, fb);
        std::vector<double> jd(n);
        for (std::size_t i = 0; i < n; ++i)
            jd[i] = ja[i] - jb[i];
        const auto bc2 = heldout::bca_interval(bc.estimate, pd.values, jd, 0.95);
        CHECK(bc.lower == bc2.lower);
        CHECK(bc.upper == bc2.upper);
    }
    TEST_CASE("statistical sanity: the percentile interval of a mean is close to the t interval") {
        // Large n: both estimate the sampling sd of the mean; band +-15% on the width (fixed seed).
        std::mt19937_64 gen(21);
        std::normal_distribution<double> d;
        const std::size_t n = 2000;
        std::vector<double> y(n), z(n, 0.0);
        double s = 0, s2 = 0;
        for (auto& v : y) {
            v = d(gen);
            s += v;
        }
        for (auto v : y)
            s2 += (v - s / n) * (v - s / n);
        const double half_t = 1.96 * std::sqrt(s2 / (n - 1) / n);
        const auto p = heldout::bootstrap_percentile(mean_of{}, y, z, {.replicates = 400, .seed = 2});
        CHECK((p.upper - p.lower) / 2 == doctest::Approx(half_t).epsilon(0.15));
    }
    TEST_CASE("undefined replicates are left out and counted") {
        // only_flagged: the mean of y over rows with f > 0, undefined on a resample without such rows.
        // Row 0 is the only flagged row, so replicate b is undefined exactly when counts[0] == 0.
        const std::size_t n = 6;
        const std::vector<double> y{5, 1, 2, 3, 4, 6}, f{1, 0, 0, 0, 0, 0};
        const heldout::bootstrap_options o{.replicates = 300, .seed = 4};
        std::size_t expect_undefined = 0;
        std::vector<std::uint32_t> counts(n);
        for (std::size_t b = 0; b < o.replicates; ++b) {
            heldout::bootstrap_counts(counts, o.seed, b);
            expect_undefined += counts[0] == 0;
        }
        REQUIRE(expect_undefined > 50); // about (5/6)^6 = 33% of replicates
        const auto r = heldout::bootstrap_percentile(only_flagged{}, y, f, o);
        CHECK(r.undefined_replicates == expect_undefined);
        CHECK(r.replicates == o.replicates - expect_undefined);
        CHECK(r.lower == 5.0); // every defined replicate is the mean of row 0's copies: 5
        CHECK(r.upper == 5.0);
    }
    TEST_CASE("bad input names the function and the argument") {
        const std::vector<double> y{1, 2, 3}, f{1, 2}, g{1, 2, 3};
        CHECK_THROWS_WITH_AS(heldout::bootstrap_percentile(heldout::measure::mse{}, y, f),
                             "heldout::bootstrap_percentile: argument 'prediction': size 2 differs from size 3 of "
                             "'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::bootstrap_bca(heldout::measure::mse{}, y, g, {.replicates = 1}),
                             "heldout::bootstrap_bca: argument 'replicates': need at least 2 replicates, got 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::bootstrap_percentile(heldout::measure::mse{}, y, g, {.level = 1.5}),
                             "heldout::bootstrap_percentile: argument 'level': confidence level 1.5 outside (0, 1)",
                             heldout::input_error);
        const std::vector<double> nan{1, std::nan(""), 3};
        CHECK_THROWS_WITH_AS(heldout::bootstrap_percentile(heldout::measure::mse{}, y, nan),
                             "measure MSE: argument 'prediction': not finite (nan) at index 1", heldout::input_error);
        const std::vector<double> reps{1, std::nan("")};
        CHECK_THROWS_WITH_AS(heldout::percentile_interval(1.0, reps),
                             "heldout::percentile_interval: argument 'replicates': not finite (nan) at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::replicate_quantile(reps, 0.5), heldout::input_error);
        CHECK_THROWS_AS(heldout::replicate_quantile(g, 1.5), heldout::input_error);
        CHECK(heldout::replicate_quantile(g, 0.25) == 1.5); // type 7: h = 2 * 0.25 = 0.5 between 1 and 2
    }
}

TEST_SUITE("estimate/bootstrap") {
    TEST_CASE("AUC fast path (ranked_sample) equals the generic weighted route, replicate by replicate") {
        std::mt19937_64 gen(8); // test data only
        std::normal_distribution<double> d;
        const std::size_t n = 300;
        std::vector<int> y(n);
        std::vector<double> s(n), s2(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = i % 3 == 0;
            s[i] = std::round((d(gen) + y[i]) * 8) / 8; // rounding makes ties
            s2[i] = std::round((d(gen) + 0.5 * y[i]) * 8) / 8;
        }
        const heldout::bootstrap_options o{.replicates = 60, .seed = 3, .level = 0.9};
        const auto fast = heldout::bootstrap_replicates(heldout::measure::auc{}, y, s, o);
        // Generic route by hand: the documented draws, read as positions in the documented
        // resampling order (ascending score; within ties the negatives first, then the
        // positives, each in row order; built here with std::stable_sort), become weights by row
        // for the AUC accumulator (which sorts every time).
        std::vector<std::size_t> order(n);
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::stable_sort(order.begin(), order.end(),
                         [&](std::size_t a, std::size_t b) { return s[a] < s[b] || (s[a] == s[b] && y[a] < y[b]); });
        std::vector<std::uint32_t> c(n), w(n);
        for (std::size_t b = 0; b < o.replicates; ++b) {
            heldout::bootstrap_counts(c, o.seed, b);
            for (std::size_t k = 0; k < n; ++k)
                w[order[k]] = c[k];
            CHECK(heldout_test::close(fast.values[b], heldout::evaluate(heldout::measure::auc{}, y, s, w), 1e-14));
        }
        // Jackknife: closed form vs leaving each row out and recomputing (brute force).
        const auto jack = heldout::jackknife_values(heldout::measure::auc{}, y, s);
        for (std::size_t i = 0; i < n; i += 7) {
            std::vector<int> yy;
            std::vector<double> ss;
            for (std::size_t j = 0; j < n; ++j)
                if (j != i) {
                    yy.push_back(y[j]);
                    ss.push_back(s[j]);
                }
            CHECK(heldout_test::close(jack[i], heldout::evaluate(heldout::measure::auc{}, yy, ss), 1e-14));
        }
        const auto b = heldout::bootstrap_bca(heldout::measure::auc{}, y, s, o);
        const auto b2 = heldout::bca_interval(heldout::evaluate(heldout::measure::auc{}, y, s), fast.values, jack, 0.9);
        CHECK(b.lower == b2.lower);
        CHECK(b.upper == b2.upper);
        // Paired AUC: the same by-row resample for both models; difference replicate by replicate.
        const auto pd = heldout::paired_bootstrap_replicates(heldout::measure::auc{}, y, s, s2, o);
        for (std::size_t b = 0; b < o.replicates; ++b) {
            heldout::bootstrap_counts(c, o.seed, b);
            const double d = heldout::evaluate(heldout::measure::auc{}, y, s, c) -
                             heldout::evaluate(heldout::measure::auc{}, y, s2, c);
            CHECK(heldout_test::close(pd.values[b], d, 1e-12, 1e-14));
        }
        const auto pb = heldout::paired_bootstrap_bca(heldout::measure::auc{}, y, s, s2, o);
        CHECK(pb.lower < pb.estimate);
        CHECK(pb.upper > pb.estimate);
    }
    TEST_CASE("the vectorised byte-count pass of the AUC replicate equals a plain loop, counts up to 255") {
        std::mt19937_64 g(12); // test data only
        for (std::size_t n : {0u, 15u, 16u, 17u, 1000u, 16 * 1024u + 5u, 40000u}) {
            std::vector<std::uint8_t> c(n), f(n);
            for (std::size_t i = 0; i < n; ++i) {
                c[i] = static_cast<std::uint8_t>(g() % 8 == 0 ? 255 - g() % 3 : g() % 4);
                f[i] = static_cast<std::uint8_t>(g() % 2);
            }
            std::uint64_t s = 0, neg = 0, pos = 0;
            std::size_t i = heldout::detail::byte_count_sums(c.data(), f.data(), n, s, neg, pos);
            CHECK(i % 16 == 0);
            CHECK(i <= n);
            for (; i < n; ++i) { // the scalar rest, as the engine does
                if (f[i]) {
                    s += c[i] * neg;
                    pos += c[i];
                } else {
                    neg += c[i];
                }
            }
            std::uint64_t s_ref = 0, neg_ref = 0, pos_ref = 0;
            for (std::size_t k = 0; k < n; ++k) {
                if (f[k]) {
                    s_ref += c[k] * neg_ref;
                    pos_ref += c[k];
                } else {
                    neg_ref += c[k];
                }
            }
            CAPTURE(n);
            CHECK(s == s_ref);
            CHECK(neg == neg_ref);
            CHECK(pos == pos_ref);
        }
    }
    TEST_CASE("AUC with one positive: resamples without it are left out; the jackknife is undefined") {
        const std::vector<int> y{1, 0, 0, 0, 0};
        const std::vector<double> s{0.9, 0.1, 0.2, 0.3, 0.95};
        const auto r = heldout::bootstrap_percentile(heldout::measure::auc{}, y, s, {.replicates = 100, .seed = 1});
        CHECK(r.undefined_replicates > 10); // (4/5)^5 = 33% lack the positive
        CHECK(r.undefined_replicates + r.replicates == 100);
        CHECK_THROWS_AS(heldout::bootstrap_bca(heldout::measure::auc{}, y, s, {.replicates = 100}),
                        heldout::undefined_error);
        const std::vector<int> one_class{0, 0, 0};
        const std::vector<double> s3{0.1, 0.2, 0.3};
        CHECK_THROWS_AS(heldout::bootstrap_percentile(heldout::measure::auc{}, one_class, s3),
                        heldout::undefined_error);
    }
}
