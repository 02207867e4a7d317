// Tests for heldout/estimate/t_interval.hpp: t and normal intervals for a mean of losses.
#include <heldout/estimate/t_interval.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <vector>

TEST_SUITE("estimate/t_interval") {
    TEST_CASE("t quantiles agree with R 4.2.2 qt to 1e-12 (R 4.2.2 qnorm/qt, mpmath agrees)") {
        // R qt(0.975, df) (R 4.2.2); mpmath agrees with qt(0.975, 7) to 15 digits.
        CHECK(heldout_test::close(heldout::detail::two_sided_t(0.95, 7), 2.36462425159278, 1e-12));
        CHECK(heldout_test::close(heldout::detail::two_sided_t(0.95, 9), 2.26215716279820, 1e-12));
        CHECK(heldout_test::close(heldout::detail::two_sided_t(0.95, 14), 2.14478668791780, 1e-12));
        CHECK(heldout_test::close(heldout::detail::two_sided_t(0.95, 5), 2.57058183563631, 1e-12));
        // R qnorm(0.975), qnorm(0.95) (R 4.2.2 qnorm/qt, mpmath agrees).
        CHECK(heldout_test::close(heldout::detail::two_sided_z(0.95), 1.959963984540054, 1e-15));
        CHECK(heldout_test::close(heldout::detail::two_sided_z(0.90), 1.6448536269514722, 1e-15));
    }
    TEST_CASE("Student 1908, worked by hand example: R t.test conf.int and the normal interval") {
        const std::vector<double> l{0.2, 0.5, 0.1, 0.9, 0.4, 0.3, 0.7, 0.0};
        const auto t = heldout::t_interval(l, 0.95);
        CHECK(heldout_test::close(t.mean, 0.3875, 1e-15));
        CHECK(heldout_test::close(t.se, 0.107632808328, 1e-11));    // worked by hand
        CHECK(heldout_test::close(t.lower, 0.132988851161, 1e-11)); // R 4.2.2 t.test(x)$conf.int
        CHECK(heldout_test::close(t.upper, 0.642011148839, 1e-11)); // R 4.2.2 t.test(x)$conf.int
        CHECK(t.df == 7);
        CHECK(t.n == 8);
        const auto z = heldout::normal_interval(l, 0.95);
        CHECK(heldout_test::close(z.lower, 0.176543572122, 1e-11)); // Student 1908, worked by hand [SELF]
        CHECK(heldout_test::close(z.upper, 0.598456427878, 1e-11));
        CHECK(std::isinf(z.df));
        // 0/1 losses leave [0, 1] under the t interval (why binomial intervals exist).
        const std::vector<int> e{1, 0, 0, 1, 0, 0, 0, 0, 1, 0};
        const auto te = heldout::t_interval(e);
        CHECK(heldout_test::close(te.se, 0.152752523165, 1e-11));  // Student 1908, worked by hand [SELF]
        CHECK(heldout_test::close(te.lower, -0.0455502144, 1e-9)); // Student 1908, worked by hand (10 digits given)
        CHECK(heldout_test::close(te.upper, 0.6455502144, 1e-9));
    }
    TEST_CASE("live reference: scipy.stats.t.ppf, t.sf and norm.ppf") {
        heldout_test::reference_table ref("ref_intervals");
        const auto& df = ref.get("tq.df");
        const auto& p = ref.get("tq.p");
        const auto& q = ref.get("tq.ppf");
        const auto& qr = ref.get("tq.ppf_refined");
        for (std::size_t i = 0; i < df.size(); ++i) {
            const double mine = boost::math::quantile(boost::math::students_t_distribution<double>(df[i]), p[i]);
            CAPTURE(df[i]);
            CAPTURE(p[i]);
            // scipy t.ppf refined by Newton steps on scipy t.cdf (ref_intervals.py tppf): 1e-12.
            CHECK(heldout_test::close(mine, qr[i], 1e-12));
            // raw scipy 1.10.1 t.ppf is accurate only to ~1e-9 relative (checked against R 4.2.2 qt).
            CHECK(heldout_test::close(mine, q[i], 1e-8));
        }
        const auto& sdf = ref.get("tq.sf_df");
        const auto& sx = ref.get("tq.sf_x");
        const auto& sv = ref.get("tq.sf");
        for (std::size_t i = 0; i < sdf.size(); ++i)
            CHECK(heldout_test::close(heldout::detail::two_sided_t_p(sx[i], sdf[i]) / 2, sv[i], 1e-11)); // t.sf
        const auto& np = ref.get("tq.norm_p");
        const auto& nq = ref.get("tq.norm_ppf");
        for (std::size_t i = 0; i < np.size(); ++i)
            CHECK(heldout_test::close(heldout::detail::normal_quantile(np[i]), nq[i], 1e-14)); // norm.ppf
    }
    TEST_CASE("live reference: scipy.stats.t.interval / norm.interval on random losses") {
        heldout_test::reference_table ref("ref_intervals");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "tint.case" + std::to_string(c) + ".";
            const auto& x = ref.get(k + "x");
            const double lev = ref.scalar(k + "level");
            const auto t = heldout::t_interval(x, lev);
            const auto z = heldout::normal_interval(x, lev);
            CAPTURE(c);
            CHECK(heldout_test::close(t.mean, ref.scalar(k + "mean"), 1e-14)); // numpy.mean
            CHECK(heldout_test::close(t.se, ref.scalar(k + "se"), 1e-9)); // np.var(ddof=1); case 4 cancels in numpy too
            const double q = ref.get(k + "t")[1] - ref.scalar(k + "mean");
            CHECK(heldout_test::close(t.upper - t.mean, q, 1e-8)); // scipy t.interval (raw t.ppf, ~1e-9)
            // refined scipy t quantile: the half width over se to 1e-12 (not in case 4, where
            // upper - mean cancels: mean 1e6, half width 1e-4)
            if (c < 4)
                CHECK(heldout_test::close((t.upper - t.mean) / t.se,
                                          ref.scalar(k + "t_half_refined") / ref.scalar(k + "se"), 1e-12));
            const double qz = ref.get(k + "norm")[1] - ref.scalar(k + "mean");
            CHECK(heldout_test::close(z.upper - z.mean, qz, 1e-8)); // scipy norm.interval
        }
    }
    TEST_CASE("two-pass variance survives large losses with a tiny spread") {
        // 1e8 + {0, 1e-4, 2e-4, ...}: the one-pass sum(x^2) - n m^2 loses every digit here.
        std::vector<double> x;
        for (int i = 0; i < 101; ++i)
            x.push_back(1e8 + 1e-4 * (i - 50));
        // Exact: deviations 1e-4 * (i - 50), sum of squares = 1e-8 * 2 * sum_{j=1}^{50} j^2 = 1e-8 * 85850.
        const double var = 1e-8 * 85850 / 100;
        const auto t = heldout::t_interval(x);
        CHECK(std::abs(t.se - std::sqrt(var / 101)) <= 1e-6 * std::sqrt(var / 101));
    }
    TEST_CASE("losses near +-1e308 and near 1e-200: the interval of the scaled losses, scaled back") {
        // A mean interval is equivariant under scaling: interval(c x) = c interval(x) (Student
        // 1908's formulas are homogeneous of degree 1). With c = 2^k every step is exact in
        // binary floating point, so the interval of losses near the double range's ends must
        // equal, bit for bit, that of the same losses moved to the middle of the range. Before
        // the scaled passes the sum overflowed (mean inf, bounds NaN) or the squares underflowed
        // (se 0: a silent zero-width interval).
        const auto check = [](const std::vector<double>& x, int k) {
            std::vector<double> mid;
            for (double v : x)
                mid.push_back(std::ldexp(v, -k));
            for (const bool student : {true, false}) {
                CAPTURE(student);
                const auto a = student ? heldout::t_interval(x) : heldout::normal_interval(x);
                const auto b = student ? heldout::t_interval(mid) : heldout::normal_interval(mid);
                CHECK(a.mean == std::ldexp(b.mean, k));
                CHECK(a.se == std::ldexp(b.se, k));
                CHECK(a.lower == std::ldexp(b.lower, k));
                CHECK(a.upper == std::ldexp(b.upper, k));
                CHECK(std::isfinite(a.lower));
                CHECK(a.se > 0);
            }
        };
        check({1.0e308, 1.5e308, 1.2e308, 0.9e308, 1.1e308}, 1000);    // the sum overflows
        check({-1.0e308, 1.0e308, -0.5e308, 0.5e308, 0.25e308}, 1000); // the squares overflow
        check({1e-200, 2e-200, 4e-200, 3e-200}, -700);                 // the squares underflow
        // A bound beyond the double range: an input_error, not an infinity.
        const std::vector<double> wide{-1.7e308, 1.7e308};
        CHECK_THROWS_WITH_AS(heldout::t_interval(wide),
                             "heldout::t_interval: argument 'losses': arithmetic overflow: the interval's bounds "
                             "exceed the double range (values too large)",
                             heldout::input_error);
    }
    TEST_CASE("constant losses: zero width; n = 1 undefined; bad input") {
        const std::vector<double> c{0.5, 0.5, 0.5};
        const auto t = heldout::t_interval(c);
        CHECK(t.lower == 0.5);
        CHECK(t.upper == 0.5);
        const std::vector<double> one{0.5};
        CHECK_THROWS_WITH_AS(heldout::t_interval(one),
                             "heldout::t_interval: undefined: one observation has no variance (n = 1)",
                             heldout::undefined_error);
        const std::vector<double> none;
        CHECK_THROWS_WITH_AS(heldout::normal_interval(none), "heldout::normal_interval: argument 'losses': empty input",
                             heldout::input_error);
        const std::vector<double> bad{1.0, std::numeric_limits<double>::infinity()};
        CHECK_THROWS_WITH_AS(heldout::t_interval(bad),
                             "heldout::t_interval: argument 'losses': not finite (inf) at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::t_interval(c, 0.0),
                             "heldout::t_interval: argument 'level': confidence level 0 outside (0, 1)",
                             heldout::input_error);
    }
}
