// Tests for heldout/estimate/delong.hpp: DeLong variance of an AUC, the paired test of two AUCs,
// the k-model covariance and its chi-squared contrast test (Sun & Xu midrank route).
#include <heldout/estimate/delong.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>
#include <vector>

namespace {
// DeLong et al. 1988, worked by hand paired example: 20 cases, the first 10 positive.
const std::vector<int> y20{1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0};
const std::vector<double> s1{.90, .80, .80, .70, .65, .60, .55, .50, .40, .30,
                             .70, .60, .45, .40, .35, .30, .20, .20, .10, .05};
const std::vector<double> s2{.85, .75, .60, .60, .55, .50, .45, .45, .35, .20,
                             .80, .50, .50, .40, .30, .25, .25, .20, .15, .10};
} // namespace

TEST_SUITE("estimate/delong") {
    TEST_CASE("DeLong et al. 1988, worked by hand 20-case paired example (DeLong et al. 1988 formulas; values [SELF] "
              "exact fractions, "
              "logit CI and p value [R])") {
        // Covariance S = [[91/11250, 37/3750], [37/3750, 259/20000]] (O(mn) definition, exact fractions by hand).
        Eigen::MatrixXd s(20, 2);
        for (int i = 0; i < 20; ++i) {
            s(i, 0) = s1[static_cast<std::size_t>(i)];
            s(i, 1) = s2[static_cast<std::size_t>(i)];
        }
        const auto c = heldout::delong_covariance(y20, s);
        CHECK(c.auc[0] == doctest::Approx(21.0 / 25).epsilon(1e-15));
        CHECK(c.auc[1] == doctest::Approx(153.0 / 200).epsilon(1e-15));
        CHECK(c.covariance(0, 0) == doctest::Approx(91.0 / 11250).epsilon(1e-13));
        CHECK(c.covariance(0, 1) == doctest::Approx(37.0 / 3750).epsilon(1e-13));
        CHECK(c.covariance(1, 0) == doctest::Approx(37.0 / 3750).epsilon(1e-13));
        CHECK(c.covariance(1, 1) == doctest::Approx(259.0 / 20000).epsilon(1e-13));
        CHECK(c.positives == 10);
        CHECK(c.negatives == 10);
        // SE1 = 0.0899382504215, SE2 = 0.113798066767 (DeLong et al. 1988, worked by hand)
        const auto e = heldout::delong_auc(y20, s1);
        CHECK(e.value == doctest::Approx(0.84).epsilon(1e-15));
        CHECK(e.se == doctest::Approx(0.0899382504215).epsilon(1e-11));
        CHECK(heldout::delong_auc(y20, s2).se == doctest::Approx(0.113798066767).epsilon(1e-11));
        // logit interval [0.585805630850, 0.951191153182] (R 4.2.2)
        CHECK(e.lower == doctest::Approx(0.585805630850).epsilon(1e-11));
        CHECK(e.upper == doctest::Approx(0.951191153182).epsilon(1e-11));
        CHECK(e.level == 0.95);
        // Wald interval [0.6637242683, 1.0162757317]: the upper limit exceeds 1 (DeLong et al. 1988, worked by hand)
        const auto w = heldout::delong_auc(y20, s1, 0.95, heldout::auc_interval_method::wald);
        CHECK(w.lower == doctest::Approx(0.6637242683).epsilon(1e-10));
        CHECK(w.upper == doctest::Approx(1.0162757317).epsilon(1e-10));
        // z = 2.07569521806, two-sided p = 0.0379221485007 (R 2*pnorm(-z)), Var(A1 - A2) = 47/36000
        const auto t = heldout::delong_test(y20, s1, s2);
        CHECK(t.difference == doctest::Approx(0.84 - 0.765).epsilon(1e-14));
        CHECK(t.se * t.se == doctest::Approx(47.0 / 36000).epsilon(1e-12));
        CHECK(t.z == doctest::Approx(2.07569521806).epsilon(1e-11));
        CHECK(t.p_value == doctest::Approx(0.0379221485007).epsilon(1e-10));
        CHECK(t.lower == doctest::Approx(t.difference - 1.959963984540054 * t.se).epsilon(1e-14));
        CHECK(t.upper == doctest::Approx(t.difference + 1.959963984540054 * t.se).epsilon(1e-14));
        // The contrast test with L = [1, -1] is z^2 on one degree of freedom.
        Eigen::MatrixXd L(1, 2);
        L << 1, -1;
        const auto chi = c.test(L);
        CHECK(chi.statistic == doctest::Approx(t.z * t.z).epsilon(1e-12));
        CHECK(chi.df == 1);
        CHECK(chi.p_value == doctest::Approx(t.p_value).epsilon(1e-10));
    }
    TEST_CASE("fast path = a self-written O(mn) numpy implementation of the 1988 formulas (ref_delong.py)") {
        heldout_test::reference_table ref("ref_delong");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int k = 0; k < cases; ++k) {
            const std::string p = "case" + std::to_string(k) + ".";
            CAPTURE(k);
            const auto y = ref.get_as<int>(p + "truth");
            const auto a = ref.get(p + "scores0");
            const auto b = ref.get(p + "scores1");
            const auto c3 = ref.get(p + "scores2");
            const double level = ref.scalar(p + "level");
            const auto auc = ref.get(p + "auc");
            const auto cov = ref.get(p + "cov");
            Eigen::MatrixXd s(static_cast<Eigen::Index>(y.size()), 3);
            for (std::size_t i = 0; i < y.size(); ++i) {
                s(static_cast<Eigen::Index>(i), 0) = a[i];
                s(static_cast<Eigen::Index>(i), 1) = b[i];
                s(static_cast<Eigen::Index>(i), 2) = c3[i];
            }
            const auto c = heldout::delong_covariance(y, s);
            for (int r = 0; r < 3; ++r) {
                CHECK(heldout_test::close(c.auc[r], auc[static_cast<std::size_t>(r)]));
                for (int q = 0; q < 3; ++q)
                    CHECK(heldout_test::close(c.covariance(r, q), cov[static_cast<std::size_t>(3 * r + q)], 1e-10));
            }
            const auto e = heldout::delong_auc(y, a, level);
            CHECK(heldout_test::close(e.value, auc[0]));
            CHECK(heldout_test::close(e.se * e.se, cov[0], 1e-10));
            const auto lg = ref.get(p + "logit");
            CHECK(heldout_test::close(e.lower, lg[0], 1e-10));
            CHECK(heldout_test::close(e.upper, lg[1], 1e-10));
            const auto wd = ref.get(p + "wald");
            const auto w = heldout::delong_auc(y, a, level, heldout::auc_interval_method::wald);
            CHECK(heldout_test::close(w.lower, wd[0], 1e-10));
            CHECK(heldout_test::close(w.upper, wd[1], 1e-10));
            const auto tt = ref.get(p + "test");
            const auto t = heldout::delong_test(y, a, b, level);
            CHECK(heldout_test::close(t.difference, tt[0], 1e-12, 1e-15));
            CHECK(heldout_test::close(t.se, tt[1], 1e-10));
            CHECK(heldout_test::close(t.z, tt[2], 1e-9, 1e-12));
            CHECK(heldout_test::close(t.p_value, tt[3], 1e-9));
            CHECK(heldout_test::close(t.lower, tt[4], 1e-10, 1e-14));
            CHECK(heldout_test::close(t.upper, tt[5], 1e-10, 1e-14));
            Eigen::MatrixXd L(2, 3);
            L << 1, -1, 0, 0, 1, -1;
            const auto chi = c.test(L);
            const auto ch = ref.get(p + "chi2");
            CHECK(heldout_test::close(chi.statistic, ch[0], 1e-9));
            CHECK(chi.df == 2);
            CHECK(heldout_test::close(chi.p_value, ch[2], 1e-9));
        }
    }
    TEST_CASE("float scores and a row-major score matrix give the same results") {
        std::vector<float> f1(s1.begin(), s1.end()), f2(s2.begin(), s2.end());
        std::vector<double> d1(f1.begin(), f1.end()), d2(f2.begin(), f2.end());
        CHECK(heldout::delong_test(y20, f1, f2).z ==
              doctest::Approx(heldout::delong_test(y20, d1, d2).z).epsilon(1e-14));
        Eigen::Matrix<float, Eigen::Dynamic, 2, Eigen::RowMajor> m(20, 2);
        for (int i = 0; i < 20; ++i) {
            m(i, 0) = f1[static_cast<std::size_t>(i)];
            m(i, 1) = f2[static_cast<std::size_t>(i)];
        }
        const auto c = heldout::delong_covariance(y20, m);
        CHECK(c.covariance(0, 1) ==
              doctest::Approx(heldout::delong_covariance(y20, Eigen::MatrixXd(m.cast<double>())).covariance(0, 1))
                  .epsilon(1e-14));
    }
    TEST_CASE("delong_test's two-model pass equals the k-model covariance route, also for a wide AUC gap and ties") {
        std::mt19937_64 g(31); // test data only
        std::normal_distribution<double> z;
        for (double gap : {0.0, 0.5, 3.0}) {
            for (std::size_t n : {40u, 5000u, 20000u}) {
                std::vector<int> y(n);
                Eigen::MatrixXd s(static_cast<Eigen::Index>(n), 2);
                std::vector<double> a(n), b(n);
                for (std::size_t i = 0; i < n; ++i) {
                    y[i] = static_cast<int>(g() % 2);
                    a[i] = std::round((z(g) + (1.0 + gap) * y[i]) * 16) / 16; // ties
                    b[i] = z(g) + 0.7 * y[i];
                    s(static_cast<Eigen::Index>(i), 0) = a[i];
                    s(static_cast<Eigen::Index>(i), 1) = b[i];
                }
                CAPTURE(gap);
                CAPTURE(n);
                const auto c = heldout::delong_covariance(y, s);
                const double var = c.covariance(0, 0) + c.covariance(1, 1) - 2 * c.covariance(0, 1);
                const auto t = heldout::delong_test(y, a, b);
                CHECK(t.difference == doctest::Approx(c.auc[0] - c.auc[1]).epsilon(1e-15));
                CHECK(heldout_test::close(t.se * t.se, var, 1e-12));
            }
        }
    }
    TEST_CASE("undefined cases and bad input") {
        // perfect separation: every V10 = 1, variance zero
        const std::vector<int> y{1, 1, 0, 0};
        const std::vector<double> perfect{0.9, 0.8, 0.2, 0.1};
        CHECK_THROWS_AS(heldout::delong_auc(y, perfect), heldout::undefined_error);
        CHECK_THROWS_WITH_AS(heldout::delong_test(y, perfect, perfect),
                             "heldout::delong_test: undefined: the variance of the difference is zero (e.g. both AUCs "
                             "are 1, or the two models rank the cases alike)",
                             heldout::undefined_error);
        const std::vector<int> one_pos{1, 0, 0, 0};
        const std::vector<double> s{0.5, 0.4, 0.6, 0.1};
        CHECK_THROWS_WITH_AS(heldout::delong_auc(one_pos, s),
                             "heldout::delong_auc: undefined: the DeLong variance needs at least 2 positives and 2 "
                             "negatives (got 1 and 3)",
                             heldout::undefined_error);
        const std::vector<int> none{0, 0, 0, 0};
        CHECK_THROWS_WITH_AS(heldout::delong_auc(none, s),
                             "heldout::delong_auc: undefined: class 1 (positives) is absent; it needs both classes",
                             heldout::undefined_error);
        std::vector<double> bad(s);
        bad[2] = std::numeric_limits<double>::quiet_NaN();
        CHECK_THROWS_WITH_AS(heldout::delong_test(y, s, bad),
                             "heldout::delong_test: argument 'scores_b': not finite (nan) at index 2",
                             heldout::input_error);
        const std::vector<double> shorter{0.1, 0.2};
        CHECK_THROWS_WITH_AS(heldout::delong_test(y, s, shorter),
                             "heldout::delong_test: argument 'scores_b': size 2 differs from size 4 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::delong_auc(y20, s1, 1.0),
                             "heldout::delong_auc: argument 'level': must lie in (0, 1), got 1", heldout::input_error);
        Eigen::MatrixXd m(20, 2);
        for (int i = 0; i < 20; ++i) {
            m(i, 0) = s1[static_cast<std::size_t>(i)];
            m(i, 1) = s1[static_cast<std::size_t>(i)];
        }
        const auto c = heldout::delong_covariance(y20, m);
        Eigen::MatrixXd L(1, 2);
        L << 1, -1;
        CHECK_THROWS_AS(c.test(L), heldout::undefined_error); // identical models: L S L' = 0
        Eigen::MatrixXd dep(2, 2);
        dep << 1, -1, 2, -2;
        CHECK_THROWS_WITH_AS(c.test(dep),
                             "heldout::auc_covariance::test: argument 'L': rows are linearly dependent (rank 1 < 2)",
                             heldout::input_error);
        Eigen::MatrixXd wrong(1, 3);
        wrong << 1, -1, 0;
        CHECK_THROWS_AS(c.test(wrong), heldout::input_error);
    }
}
