// Tests for heldout/measure/auc.hpp: exact AUC, its accumulator, heldout::ranked_sample, and
// (through them) the radix sort of detail/radix_sort.hpp.
#include <heldout/measure/auc.hpp>

#include <heldout/core/random.hpp>
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/partial_auc.hpp>
#include <heldout/measure/ranked_sample.hpp>
#include <heldout/measure/roc_points.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <functional>
#include <limits>
#include <numeric>
#include <random>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::auc;

using heldout_test::check_fresh_merges;

namespace {
// Self-written O(n^2) reference of the Mann–Whitney definition (Bamber 1975): sum of
// w_i w_j psi(X_i, Y_j) over positive-negative pairs, psi = 1, 1/2, 0.
template <class S>
double brute_auc(const std::vector<int>& y, const std::vector<S>& s, const std::vector<double>* w = nullptr) {
    long double num = 0, wp = 0, wn = 0;
    for (std::size_t i = 0; i < y.size(); ++i) {
        const long double wi = w ? (*w)[i] : 1.0;
        (y[i] ? wp : wn) += wi;
        if (!y[i])
            continue;
        for (std::size_t j = 0; j < y.size(); ++j) {
            if (y[j])
                continue;
            const long double wj = w ? (*w)[j] : 1.0;
            num += wi * wj * (s[i] > s[j] ? 1.0L : s[i] == s[j] ? 0.5L : 0.0L);
        }
    }
    return static_cast<double>(num / (wp * wn));
}

} // namespace

TEST_SUITE("measure/auc") {
    TEST_CASE("worked example: Davis & Goadrich 2006, worked by hand Check A, ROC AUC = 0.6875") {
        // Positives 0.9, 0.7, 0.6, 0.4; negatives 0.8, 0.55, 0.5, 0.3. Pairs won by a positive:
        // 0.9: 4, 0.7: 3, 0.6: 3, 0.4: 1 -> U = 11, AUC = 11/16 = 0.6875 worked by hand.
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0};
        const std::vector<double> s{0.9, 0.8, 0.7, 0.6, 0.55, 0.5, 0.4, 0.3};
        CHECK(evaluate(auc{}, y, s) == 0.6875);
        // Davis & Goadrich 2006, worked by hand Check B (ties): ROC AUC = 0.58.
        const std::vector<int> yb{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<double> sb{0.9, 0.8, 0.8, 0.7, 0.7, 0.7, 0.5, 0.4, 0.4, 0.2};
        CHECK(evaluate(auc{}, yb, sb) == doctest::Approx(0.58).epsilon(1e-15));
        // DeLong et al. 1988, worked by hand paired example, Â1 = 21/25 and Â2 = 153/200 worked by hand, = scipy
        // mannwhitneyu U/(mn).
        const std::vector<int> y20{1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0};
        const std::vector<double> s1{.90, .80, .80, .70, .65, .60, .55, .50, .40, .30,
                                     .70, .60, .45, .40, .35, .30, .20, .20, .10, .05};
        const std::vector<double> s2{.85, .75, .60, .60, .55, .50, .45, .45, .35, .20,
                                     .80, .50, .50, .40, .30, .25, .25, .20, .15, .10};
        CHECK(evaluate(auc{}, y20, s1) == doctest::Approx(0.84).epsilon(1e-15));
        CHECK(evaluate(auc{}, y20, s2) == doctest::Approx(0.765).epsilon(1e-15));
    }
    TEST_CASE("auc is a higher-is-better score measure") {
        CHECK(heldout::outer_measure<auc>);
        CHECK(auc{}.name() == "AUC");
        CHECK(auc::better == heldout::direction::higher_is_better);
        CHECK(auc::kind == heldout::prediction_kind::score);
    }
    TEST_CASE("live reference: scipy.stats.mannwhitneyu U/(m n), heavy ties, integer weights = replicated rows") {
        heldout_test::reference_table ref("ref_auc");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get_as<int>(k + "truth");
            const auto s = ref.get(k + "scores");
            const auto w = ref.get(k + "weights");
            const double a = ref.scalar(k + "auc"), wa = ref.scalar(k + "wauc");
            CAPTURE(c);
            CHECK(heldout_test::close(evaluate(auc{}, y, s), a));     // scipy.stats.mannwhitneyu
            CHECK(heldout_test::close(evaluate(auc{}, y, s, w), wa)); // mannwhitneyu on np.repeat rows
            const auto yu8 = ref.get_as<std::uint8_t>(k + "truth");
            const std::vector<float> sf(s.begin(), s.end());
            if (c == 3) // float32-exact scores: the float path gives the same value
                CHECK(heldout_test::close(evaluate(auc{}, yu8, sf), a));
            heldout::ranked_sample r(yu8, s);
            CHECK(heldout_test::close(r.auc(), a));
            CHECK(heldout_test::close(r.auc(std::span<const double>(w)), wa));
            std::vector<std::uint32_t> counts(r.size());
            for (std::size_t i = 0; i < r.size(); ++i)
                counts[i] = static_cast<std::uint32_t>(w[r.row(i)]);
            CHECK(heldout_test::close(r.auc_in_rank_order(counts), wa));
        }
    }
    TEST_CASE("identities: AUC(-s) = 1 - AUC(s); strictly increasing transforms; all tied = 0.5") {
        std::mt19937_64 g(11); // test data only
        std::normal_distribution<double> d;
        std::vector<int> y(3001);
        std::vector<double> s(y.size()), neg(y.size()), tr(y.size());
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<int>(g() % 2);
            s[i] = std::round((d(g) + y[i]) * 8) / 8; // ties
            neg[i] = -s[i];
            tr[i] = std::exp(s[i]) * 3 + 1; // strictly increasing
        }
        const double a = evaluate(auc{}, y, s);
        CHECK(evaluate(auc{}, y, neg) == doctest::Approx(1 - a).epsilon(1e-15));
        CHECK(evaluate(auc{}, y, tr) == a);
        const std::vector<double> flat(y.size(), 0.25);
        CHECK(evaluate(auc{}, y, flat) == 0.5);
        // -0 and +0 are one tie group
        const std::vector<int> yz{1, 0};
        const std::vector<double> sz{-0.0, 0.0};
        CHECK(evaluate(auc{}, yz, sz) == 0.5);
    }
    TEST_CASE("against a self-written O(n^2) double loop: float, double, weights, bool/uint8/int labels") {
        std::mt19937_64 g(5);
        std::uniform_real_distribution<float> u(-1, 1);
        for (int rep = 0; rep < 20; ++rep) {
            const std::size_t n = 2 + g() % 300;
            std::vector<int> y(n);
            std::vector<float> sf(n);
            std::vector<double> sd(n), w(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<int>(g() % 2);
                sf[i] = rep % 3 == 0 ? static_cast<float>(g() % 5) : u(g); // some heavy ties
                sd[i] = static_cast<double>(sf[i]) * (1 + 1e-12 * static_cast<double>(g() % 3));
                w[i] = static_cast<double>(g() % 7) * 0.25;
            }
            y[0] = 0;
            y[1] = 1;
            w[0] = w[1] = 1;
            std::vector<std::uint8_t> yu8(y.begin(), y.end());
            bool yb[302];
            for (std::size_t i = 0; i < n; ++i)
                yb[i] = y[i] != 0;
            CHECK(evaluate(auc{}, y, sf) == doctest::Approx(brute_auc(y, sf)).epsilon(1e-15));
            CHECK(evaluate(auc{}, yu8, sd) == doctest::Approx(brute_auc(y, sd)).epsilon(1e-15));
            CHECK(evaluate(auc{}, std::span<const bool>(yb, n), sf) ==
                  doctest::Approx(brute_auc(y, sf)).epsilon(1e-15));
            CHECK(evaluate(auc{}, y, sd, w) == doctest::Approx(brute_auc(y, sd, &w)).epsilon(1e-13));
        }
    }
    TEST_CASE("double scores sharing their high 32 bits (long runs refined by the low half) match the O(n^2) loop") {
        std::mt19937_64 g(21);
        for (std::size_t n : {40u, 2000u}) {
            std::vector<int> y(n);
            std::vector<double> s(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<int>(g() % 2);
                // 0.5 + k * 2^-45: one high half for all, ties among equal k
                s[i] = 0.5 + static_cast<double>(g() % 300 + (y[i] ? 20 : 0)) * 0x1p-45;
            }
            y[0] = 0;
            y[1] = 1;
            CAPTURE(n);
            CHECK(evaluate(auc{}, y, s) == doctest::Approx(brute_auc(y, s)).epsilon(1e-15));
            heldout::ranked_sample r(y, s);
            CHECK(r.auc() == evaluate(auc{}, y, s));
            bool ordered = true;
            for (std::size_t i = 1; i < n; ++i)
                ordered = ordered && s[r.row(i - 1)] <= s[r.row(i)] &&
                          (r.ends_group(i - 1) == (s[r.row(i - 1)] < s[r.row(i)]));
            CHECK(ordered);
        }
    }
    TEST_CASE("double keys split by fitted exponent codes: signs, zeros, subnormals, extremes, one exponent, "
              "thousands of exponents, widened floats, long tied runs") {
        // The fitted split of detail::double_split (code of sign and exponent, leading mantissa
        // bits, rest) must order like the scores and keep equal scores exactly together in
        // every regime of code widths: checked against std::sort of the scores, the O(n^2)
        // loop and the thresholds of roc_points (which rebuild each score from its split key).
        constexpr double dmax = std::numeric_limits<double>::max();
        constexpr double tiny = std::numeric_limits<double>::denorm_min();
        constexpr double low = std::numeric_limits<double>::min();
        const std::vector<double> pool{-dmax, -1e300, -2.5, -1,       -low, -3 * tiny, -tiny,
                                       -0.0,  0.0,    tiny, 3 * tiny, low,  0.1,       std::nextafter(0.1, 1.0),
                                       1,     1e300,  dmax};
        std::mt19937_64 g(77);
        const auto unit = [&] { return static_cast<double>(g() >> 11) * 0x1p-53; };
        for (int family = 0; family < 6; ++family) {
            const std::size_t n = family == 5 ? 3000 : 1500;
            std::vector<int> y(n);
            std::vector<double> s(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<int>(g() % 2);
                switch (family) {
                case 0: // special values and their neighbours, ties among them
                    s[i] =
                        g() % 2 ? pool[g() % pool.size()] : (unit() - 0.5) * std::ldexp(1.0, static_cast<int>(g() % 9));
                    break;
                case 1: // over 2048 sign-and-exponent values: 12 code bits, 20 mantissa bits in the key
                    s[i] = (g() % 2 ? -1 : 1) * std::ldexp(1 + unit(), static_cast<int>(g() % 2041) - 1020);
                    break;
                case 2: // one exponent, differing in the last bits only: one long run refined by the rest
                    s[i] = 1 + static_cast<double>(g() % 700 + (y[i] ? 50 : 0)) * 0x1p-52;
                    break;
                case 3: // floats widened to double: no rest bits, runs are ties
                    s[i] = static_cast<double>(static_cast<float>(unit() * (y[i] ? 1.2 : 1.0)));
                    if (g() % 4 == 0)
                        s[i] = 0.25;
                    break;
                case 4: // few distinct values with rest bits: long tied runs (equal rests)
                    s[i] = static_cast<double>(g() % 40 + (y[i] ? 3 : 0)) / 1000.0;
                    break;
                default: // signed, continuous, with exact zeros (a zero code between the signs)
                    s[i] = g() % 50 == 0 ? 0.0 : std::log(unit() / (1 - unit() + 1e-300) + 1e-300);
                    break;
                }
            }
            y[0] = 0;
            y[1] = 1;
            CAPTURE(family);
            CHECK(evaluate(auc{}, y, s) == doctest::Approx(brute_auc(y, s)).epsilon(1e-15));
            heldout::ranked_sample r(y, s);
            bool ordered = true;
            for (std::size_t i = 1; i < n; ++i)
                ordered = ordered && s[r.row(i - 1)] <= s[r.row(i)] &&
                          (r.ends_group(i - 1) == (s[r.row(i - 1)] < s[r.row(i)]));
            CHECK(ordered);
            std::vector<double> distinct(s.begin(), s.end());
            for (double& x : distinct)
                x += 0.0; // -0 and +0 are one score
            std::sort(distinct.begin(), distinct.end(), std::greater<>());
            distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
            const auto pts = heldout::roc_points(y, s);
            REQUIRE(pts.size() == distinct.size() + 1);
            bool thresholds = true;
            for (std::size_t i = 0; i < distinct.size(); ++i)
                thresholds = thresholds && std::bit_cast<std::uint64_t>(pts[i + 1].threshold) ==
                                               std::bit_cast<std::uint64_t>(distinct[i]);
            CHECK(thresholds);
        }
    }
    TEST_CASE("radix sort property: same order as std::stable_sort, payload carried, all passes and skips") {
        std::mt19937_64 g(3);
        for (int rep = 0; rep < 6; ++rep) {
            const std::size_t n = 1 + g() % 5000;
            std::vector<float> f(n);
            std::vector<double> d(n);
            for (std::size_t i = 0; i < n; ++i) {
                const std::uint32_t bits = static_cast<std::uint32_t>(g());
                float x = std::bit_cast<float>(bits);
                if (!std::isfinite(x))
                    x = static_cast<float>(bits % 7) - 3.0f;
                if (rep == 1)
                    x = static_cast<float>(g() % 4) * 0.25f; // few values: most digits constant
                if (i % 97 == 0)
                    x = (i % 2) ? -0.0f : 0.0f;
                f[i] = x;
                double xd = std::bit_cast<double>(g());
                if (!std::isfinite(xd))
                    xd = -1.5;
                if (rep == 2)
                    xd = static_cast<double>(g() % 1000) / 1000.0; // doubles in [0, 1)
                d[i] = xd;
            }
            auto check = [&](const auto& v) {
                using T = typename std::remove_cvref_t<decltype(v)>::value_type;
                using K = heldout::detail::radix_key_t<T>;
                std::vector<K> k(n), kt(n);
                std::vector<std::uint32_t> p(n), pt(n);
                for (std::size_t i = 0; i < n; ++i) {
                    k[i] = heldout::detail::order_key(v[i]);
                    p[i] = static_cast<std::uint32_t>(i);
                    CHECK((heldout::detail::key_score(k[i]) == v[i]));
                }
                const bool in_tmp = heldout::detail::radix_sort(k.data(), kt.data(), p.data(), pt.data(), n);
                const auto& ks = in_tmp ? kt : k;
                const auto& ps = in_tmp ? pt : p;
                std::vector<std::uint32_t> expect(n);
                std::iota(expect.begin(), expect.end(), 0u);
                std::stable_sort(expect.begin(), expect.end(), [&](auto a, auto b) { return v[a] < v[b]; });
                bool same = true;
                for (std::size_t i = 0; i < n; ++i)
                    same = same && ps[i] == expect[i] && ks[i] == heldout::detail::order_key(v[expect[i]]);
                CHECK(same);
            };
            check(f);
            check(d);
        }
    }
    TEST_CASE("payload-free radix sort of packed 33-bit keys (score key << 1 | label) equals std::sort") {
        std::mt19937_64 g(17);
        for (int rep = 0; rep < 5; ++rep) {
            const std::size_t n = 1 + g() % 7000;
            std::vector<std::uint64_t> k(n), t(n);
            for (std::size_t i = 0; i < n; ++i) {
                float x = std::bit_cast<float>(static_cast<std::uint32_t>(g()));
                if (!std::isfinite(x) || rep == 1)
                    x = static_cast<float>(g() % 3); // few values: skipped passes
                k[i] = (std::uint64_t{heldout::detail::order_key(x)} << 1) | (g() & 1u);
            }
            std::vector<std::uint64_t> expect = k;
            std::sort(expect.begin(), expect.end());
            std::vector<std::uint32_t> hist(heldout::detail::radix_layout<std::uint64_t, 11, 33>::histogram_size);
            const bool in_tmp = heldout::detail::radix_sort_keys<33>(k.data(), t.data(), n, hist.data(), false);
            CHECK(((in_tmp ? t : k) == expect));
        }
    }
    TEST_CASE("evaluate scores a whole set in place: the same value and errors as the accumulator route") {
        std::mt19937_64 g(29);
        for (int rep = 0; rep < 8; ++rep) {
            const std::size_t n = 2 + g() % 400;
            std::vector<std::uint8_t> y(n);
            std::vector<float> sf(n);
            std::vector<double> sd(n), w(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<std::uint8_t>(g() % 2);
                // ties, or any finite bit pattern (denormals, huge values, both signs)
                const float any = std::bit_cast<float>(static_cast<std::uint32_t>(g()));
                sf[i] = rep % 2 ? static_cast<float>(g() % 4) - 1.5f : (std::isfinite(any) ? any : -0.0f);
                sd[i] = static_cast<double>(sf[i]) + (rep % 3 == 0 ? 1e-9 * static_cast<double>(g() % 5) : 0.0);
                w[i] = static_cast<double>(g() % 5) * 0.5;
            }
            y[0] = 0;
            y[1] = 1;
            w[0] = w[1] = 1;
            auto route = [&](const auto& m, const auto& s, const std::vector<double>* wt) {
                auto acc = m.accumulator();
                if (wt)
                    acc.add(y, s, *wt);
                else
                    acc.add(y, s);
                return acc.value();
            };
            const Eigen::VectorXd se = Eigen::Map<const Eigen::VectorXd>(sd.data(), static_cast<Eigen::Index>(n));
            CHECK(evaluate(auc{}, y, sf) == route(auc{}, sf, nullptr));
            CHECK(evaluate(auc{}, y, sd) == route(auc{}, sd, nullptr));
            CHECK(evaluate(auc{}, y, se) == route(auc{}, sd, nullptr));
            CHECK(evaluate(auc{}, y, sd, w) == doctest::Approx(route(auc{}, sd, &w)).epsilon(1e-15));
            CHECK(evaluate(auc{}, y, sf) ==
                  doctest::Approx(brute_auc(std::vector<int>(y.begin(), y.end()), sf)).epsilon(1e-15));
            const heldout::measure::average_precision ap;
            const heldout::measure::partial_auc pa{.fpr_low = 0, .fpr_high = 0.3, .standardized = true};
            CHECK(evaluate(ap, y, sd) == route(ap, sd, nullptr));
            CHECK(evaluate(ap, y, sf, w) == doctest::Approx(route(ap, sf, &w)).epsilon(1e-15));
            CHECK(evaluate(pa, y, sd) == doctest::Approx(route(pa, sd, nullptr)).epsilon(1e-15));
            CHECK(evaluate(heldout::measure::auprc{}, y, sf) == route(heldout::measure::auprc{}, sf, nullptr));
        }
        const std::vector<int> y{1, 0, 1};
        const std::vector<double> s{0.1, 0.2, 0.3};
        const std::vector<double> no_weights;
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, s, no_weights),
                             "measure AUC: argument 'weights': size 0 differs from size 3 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(heldout::measure::average_precision{}, y, s, no_weights),
                             "measure average precision: argument 'weights': size 0 differs from size 3 of 'truth'",
                             heldout::input_error);
    }
    TEST_CASE("batches, single observations, merges and float/double mixes give the whole-set value") {
        std::mt19937_64 g(7);
        std::normal_distribution<double> d;
        const std::size_t n = 4000;
        std::vector<int> y(n);
        std::vector<double> s(n), w(n);
        std::vector<float> sf(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = static_cast<int>(g() % 2);
            s[i] = d(g) + y[i];
            sf[i] = static_cast<float>(s[i]);
            w[i] = static_cast<double>(g() % 4);
        }
        w[0] = w[1] = 1;
        const double whole = evaluate(auc{}, y, s);
        auto a = auc{}.accumulator();
        auto b = auc{}.accumulator();
        a.add(std::span(y).first(1000), std::span(s).first(1000));
        b.add(std::span(y).subspan(1000), std::span(s).subspan(1000));
        a.merge(b);
        CHECK(a.value() == whole);
        auto c = auc{}.accumulator();
        for (std::size_t i = 0; i < n; ++i)
            c.add_one(y[i], s[i]);
        CHECK(c.value() == whole);
        // float shard merged into a double shard: value = AUC of the widened scores
        std::vector<double> mixed(s);
        for (std::size_t i = 0; i < 1000; ++i)
            mixed[i] = static_cast<double>(sf[i]);
        auto f1 = auc{}.accumulator();
        auto f2 = auc{}.accumulator();
        f1.add(std::span(y).first(1000), std::span(sf).first(1000));
        f2.add(std::span(y).subspan(1000), std::span(s).subspan(1000));
        f1.merge(f2);
        CHECK(f1.value() == evaluate(auc{}, y, mixed));
        // weighted and unweighted shards mix: unweighted rows weigh 1
        std::vector<double> w2(w);
        std::fill(w2.begin(), w2.begin() + 1000, 1.0);
        auto m1 = auc{}.accumulator();
        auto m2 = auc{}.accumulator();
        m1.add(std::span(y).first(1000), std::span(s).first(1000));
        m2.add(std::span(y).subspan(1000), std::span(s).subspan(1000), std::span(w).subspan(1000));
        m1.merge(m2);
        CHECK(m1.value() == doctest::Approx(evaluate(auc{}, y, s, w2)).epsilon(1e-14));
        // reset keeps nothing
        m1.reset();
        CHECK(m1.count() == 0);
        CHECK_THROWS_AS((void)m1.value(), heldout::undefined_error);
        // Eigen vectors work too
        Eigen::VectorXd es = Eigen::Map<Eigen::VectorXd>(s.data(), static_cast<Eigen::Index>(n));
        Eigen::VectorXi ey = Eigen::Map<Eigen::VectorXi>(y.data(), static_cast<Eigen::Index>(n));
        CHECK(evaluate(auc{}, ey, es) == whole);
    }
    TEST_CASE("merge into a fresh accumulator, add_one with a first weight not 1, self-merge: no row lost") {
        // Positives 0.9 (weight 3) and 0.3; negatives 0.8 and 0.1. Pairs won by a positive: 0.9
        // beats both, 0.3 beats 0.1: unweighted 3/4; weighted (3 + 3 + 1) / (4 * 2) = 7/8 [SELF, by
        // hand, and the O(n^2) loop above].
        const std::vector<int> y{1, 0, 1, 0};
        const std::vector<double> sd{0.9, 0.8, 0.3, 0.1}; // not floats: kept as doubles
        const std::vector<float> sf{0.9f, 0.8f, 0.3f, 0.1f};
        const std::vector<double> w{3, 1, 1, 1};
        CHECK(brute_auc(y, sd) == 0.75);
        CHECK(brute_auc(y, sd, &w) == 0.875);
        CHECK(evaluate(auc{}, y, sd, w) == 0.875);
        check_fresh_merges(auc{}, y, sd, w);
        check_fresh_merges(auc{}, y, sf, w);
        // the streaming engineer's case: a weighted double shard into a fresh accumulator
        auto shard = auc{}.accumulator();
        shard.add(y, sd, w);
        auto fresh = auc{}.accumulator();
        fresh.merge(shard);
        CHECK(fresh.value() == 0.875);
        auto one = auc{}.accumulator();
        one.add_one(1, 0.9, 3.0);
        one.add_one(0, 0.8);
        one.add_one(1, 0.3);
        one.add_one(0, 0.1);
        CHECK(one.value() == 0.875);
        // larger shards with ties, float and double, against the O(n^2) loop
        std::mt19937_64 g(17); // test data only
        std::vector<int> yl(300);
        std::vector<double> sl(yl.size()), wl(yl.size());
        for (std::size_t i = 0; i < yl.size(); ++i) {
            yl[i] = static_cast<int>(g() % 2);
            sl[i] = static_cast<double>(g() % 40) / 7 + yl[i]; // ties, most not floats
            wl[i] = static_cast<double>(g() % 5);
        }
        wl[0] = 2;
        check_fresh_merges(auc{}, yl, sl, wl);
        auto big = auc{}.accumulator();
        big.add(yl, sl, wl);
        auto bf = auc{}.accumulator();
        bf.merge(big);
        CHECK(bf.value() == doctest::Approx(brute_auc(yl, sl, &wl)).epsilon(1e-14));
    }
    TEST_CASE("ranked_sample: rank order, tie groups, counts and weights agree with the direct AUC") {
        const std::vector<int> y{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<double> s{0.9, 0.8, 0.8, 0.7, 0.7, 0.7, 0.5, 0.4, 0.4, 0.2};
        heldout::ranked_sample r(y, s);
        CHECK(r.size() == 10);
        CHECK(r.positives() == 5);
        CHECK(r.negatives() == 5);
        CHECK(r.groups() == 6);
        CHECK(r.row(0) == 9); // lowest score 0.2
        CHECK(r.positive(0));
        CHECK(r.row(1) == 7); // 0.4 tie: original order kept
        CHECK(r.row(2) == 8);
        CHECK(!r.ends_group(1));
        CHECK(r.ends_group(2));
        CHECK(r.auc() == doctest::Approx(0.58).epsilon(1e-15));
        std::vector<std::uint32_t> ones(10, 1);
        CHECK(r.auc_in_rank_order(ones) == r.auc());
        std::vector<double> w(10, 2.0);
        CHECK(r.auc(std::span<const double>(w)) == doctest::Approx(0.58).epsilon(1e-15));
        // a replicate drawing only negatives: undefined, or an empty optional
        std::vector<std::uint32_t> only_neg(10, 0);
        for (std::size_t i = 0; i < 10; ++i)
            if (!r.positive(i))
                only_neg[i] = 2;
        CHECK_THROWS_WITH_AS((void)r.auc_in_rank_order(only_neg),
                             "heldout::ranked_sample: undefined: class 1 (positives) is absent or has zero total "
                             "weight; it needs both classes",
                             heldout::undefined_error);
        CHECK(!r.try_auc_in_rank_order(only_neg).has_value());
        CHECK(r.try_auc_in_rank_order(ones).value() == r.auc());
        // bootstrap-style counts (multiplicity of each row, put in rank order) = the AUC of the resampled rows
        heldout::rng g(9);
        std::vector<std::uint32_t> by_row(10, 0);
        std::vector<int> ry;
        std::vector<double> rs;
        for (int k = 0; k < 10; ++k) {
            const auto row = g.below(10);
            ++by_row[row];
            ry.push_back(y[row]);
            rs.push_back(s[row]);
        }
        std::vector<std::uint32_t> c(10);
        for (std::size_t i = 0; i < 10; ++i)
            c[i] = by_row[r.row(i)];
        const auto direct = r.try_auc_in_rank_order(c);
        REQUIRE(direct.has_value()); // seed 9 draws both classes
        CHECK(*direct == doctest::Approx(brute_auc(ry, rs)).epsilon(1e-15));
    }
    TEST_CASE("bad input names the measure, the argument and the index; one class absent is undefined") {
        const std::vector<int> y{1, 0, 1};
        std::vector<double> s{0.1, std::numeric_limits<double>::quiet_NaN(), 0.3};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, s), "measure AUC: argument 'scores': not finite (nan) at index 1",
                             heldout::input_error);
        s[1] = -std::numeric_limits<double>::infinity();
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, s), "measure AUC: argument 'scores': not finite (inf) at index 1",
                             heldout::input_error);
        const std::vector<double> ok{0.1, 0.2, 0.3};
        const std::vector<double> shorter{0.1, 0.2};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, shorter),
                             "measure AUC: argument 'scores': size 2 differs from size 3 of 'truth'",
                             heldout::input_error);
        const std::vector<int> y2{1, 2, 0};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y2, ok),
                             "measure AUC: argument 'truth': label 2 outside the classes 0..1 at index 1",
                             heldout::input_error);
        const std::vector<int> ones{1, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, ones, ok),
                             "measure AUC: undefined: class 0 (negatives) is absent; it needs both classes",
                             heldout::undefined_error);
        const std::vector<int> zeros{0, 0, 0};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, zeros, ok),
                             "measure AUC: undefined: class 1 (positives) is absent; it needs both classes",
                             heldout::undefined_error);
        const std::vector<double> w{0, 1, 0};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, ok, w),
                             "measure AUC: undefined: class 1 (positives) is absent or has zero total weight; it "
                             "needs both classes",
                             heldout::undefined_error);
        const std::vector<double> wneg{1, -1, 1};
        CHECK_THROWS_WITH_AS(evaluate(auc{}, y, ok, wneg),
                             "measure AUC: argument 'weights': negative weight -1 at index 1", heldout::input_error);
        const std::vector<int> empty;
        const std::vector<double> es;
        CHECK_THROWS_WITH_AS(evaluate(auc{}, empty, es), "measure AUC: argument 'truth': empty input",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::ranked_sample(y, s),
                             "heldout::ranked_sample: argument 'scores': not finite (inf) at index 1",
                             heldout::input_error);
        heldout::ranked_sample r(y, ok);
        const std::vector<std::uint32_t> c2{1, 1};
        CHECK_THROWS_WITH_AS((void)r.auc_in_rank_order(c2),
                             "heldout::ranked_sample: argument 'counts': size 2 differs from size 3 of 'the sample'",
                             heldout::input_error);
        const std::vector<double> wbad{1, std::numeric_limits<double>::quiet_NaN(), 1};
        CHECK_THROWS_WITH_AS((void)r.auc(std::span<const double>(wbad)),
                             "heldout::ranked_sample: argument 'weights': not finite (nan) at index 1",
                             heldout::input_error);
        auto acc = auc{}.accumulator();
        CHECK_THROWS_WITH_AS(acc.add_one(3, 0.5), "measure AUC: argument 'truth': label 3 outside the classes 0..1",
                             heldout::input_error);
    }
    TEST_CASE("a second epoch after reset gives the same value (buffers kept, not re-grown)") {
        std::vector<int> y(1000);
        std::vector<float> s(1000);
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<int>(i % 3 == 0);
            s[i] = static_cast<float>((i * 7919) % 101);
        }
        auto acc = auc{}.accumulator();
        acc.add(y, s);
        const double v1 = acc.value();
        acc.reset();
        acc.add(y, s);
        CHECK(acc.value() == v1); // allocation counts are checked by the streaming tests (issue 7)
    }
}
