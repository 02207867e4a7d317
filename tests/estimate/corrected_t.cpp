// Tests for heldout/estimate/corrected_t.hpp: Nadeau-Bengio corrected resampled t.
#include <heldout/estimate/corrected_t.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <vector>

TEST_SUITE("estimate/corrected_t") {
    TEST_CASE("Nadeau & Bengio 2003 NB: J = 10, n1 = 90, n2 = 10") {
        const std::vector<double> d{0.02, 0.05, -0.01, 0.03, 0.04, 0.00, 0.06, 0.02, 0.01, 0.03};
        const auto c = heldout::corrected_resampled_t(d, 90, 10, 0.95);
        CHECK(heldout_test::close(c.mean, 0.025, 1e-14));
        // se^2 = (1/10 + 10/90) * 0.000472222222222 (arithmetic visible)
        CHECK(heldout_test::close(c.se * c.se, (0.1 + 1.0 / 9) * 0.000472222222222, 1e-11));
        CHECK(heldout_test::close(c.statistic, 2.50386697834, 1e-11)); // R 4.2.2 pt (Nadeau & Bengio 2003)
        CHECK(heldout_test::close(c.p_value, 0.0336476570611, 1e-10)); // R 4.2.2 pt
        CHECK(heldout_test::close(c.lower, 0.00241336518303, 1e-10));  // Nadeau & Bengio 2003 (R qt)
        CHECK(heldout_test::close(c.upper, 0.047586634817, 1e-10));
        CHECK(c.df == 9);
        CHECK(c.splits == 10);
        const auto n = heldout::naive_resampled_t(d, 0.95);
        CHECK(heldout_test::close(n.statistic, 3.63803437554, 1e-11)); // R t.test(d) (Nadeau & Bengio 2003)
        CHECK(heldout_test::close(n.p_value, 0.00541743338826, 1e-10));
        CHECK(heldout_test::close(n.lower, 0.00945481179339, 1e-10));
        CHECK(heldout_test::close(n.upper, 0.0405451882066, 1e-10));
        CHECK(n.correction == 0);
    }
    TEST_CASE("Bouckaert & Frank 2004 check: 3 x 5-fold, n_test/n_train = 1/4 (Bouckaert & Frank 2004)") {
        const std::vector<double> x{0.03, 0.01, 0.04, 0.02, 0.00, 0.02, 0.05, 0.01,
                                    0.03, 0.02, 0.04, 0.00, 0.03, 0.01, 0.02};
        const auto c = heldout::corrected_resampled_t(x, 4, 1);
        CHECK(heldout_test::close(c.mean, 0.022, 1e-13));
        CHECK(heldout_test::close(c.statistic, 2.65307013918, 1e-11)); // R 4.2.2 (Bouckaert & Frank 2004)
        CHECK(c.df == 14);
        CHECK(heldout_test::close(c.p_value, 0.0189153841296, 1e-10)); // R 4.2.2 pt
    }
    TEST_CASE("live reference: numpy + scipy.stats.t.sf / t.ppf on random differences") {
        heldout_test::reference_table ref("ref_intervals");
        for (int c = 0; c < 4; ++c) {
            const std::string k = "nb.case" + std::to_string(c) + ".";
            const auto& d = ref.get(k + "d");
            const auto& s = ref.get(k + "sizes");
            const auto& e = ref.get(k + "result");
            const auto r = heldout::corrected_resampled_t(d, s[0], s[1], s[2]);
            CAPTURE(c);
            CHECK(heldout_test::close(r.mean, e[0], 1e-13));
            CHECK(heldout_test::close(r.se, e[1], 1e-12));
            CHECK(heldout_test::close(r.statistic, e[2], 1e-12));
            CHECK(r.df == e[3]);
            CHECK(heldout_test::close(r.p_value, e[4], 1e-10)); // scipy t.sf
            CHECK(heldout_test::close(r.lower, e[5], 1e-11));   // refined scipy t.ppf (ref_intervals.py tppf)
            CHECK(heldout_test::close(r.upper, e[6], 1e-11));
            const auto& nv = ref.get(k + "naive");
            const auto n = heldout::naive_resampled_t(d, s[2]);
            CHECK(heldout_test::close(n.se, nv[0], 1e-12));
            CHECK(heldout_test::close(n.statistic, nv[1], 1e-12));
            CHECK(heldout_test::close(n.p_value, nv[2], 1e-10));
        }
    }
    TEST_CASE("one model's per-split errors: a corrected interval of the mean error") {
        const std::vector<double> err{0.21, 0.18, 0.25, 0.20, 0.22};
        const auto c = heldout::corrected_resampled_t(err, 80, 20, 0.9);
        const auto n = heldout::naive_resampled_t(err, 0.9);
        CHECK(c.mean == doctest::Approx(0.212));
        // The correction widens: se_c / se_naive = sqrt((1/5 + 1/4) / (1/5)) = 1.5.
        CHECK(heldout_test::close(c.se / n.se, 1.5, 1e-14));
        CHECK(c.lower < n.lower);
        CHECK(c.upper > n.upper);
    }
    TEST_CASE("split values near +-1e308 and near 1e-200: the result of the scaled values, scaled back") {
        // mean, se and the bounds are homogeneous of degree 1 in the values, the statistic and
        // p-value of degree 0 (Nadeau & Bengio 2003's formulas); with c = 2^k every step is
        // exact, so the values moved to the middle of the range give the oracle bit for bit.
        const auto check = [](const std::vector<double>& x, int k) {
            std::vector<double> mid;
            for (double v : x)
                mid.push_back(std::ldexp(v, -k));
            const auto a = heldout::corrected_resampled_t(x, 90, 10);
            const auto b = heldout::corrected_resampled_t(mid, 90, 10);
            CHECK(a.mean == std::ldexp(b.mean, k));
            CHECK(a.se == std::ldexp(b.se, k));
            CHECK(a.lower == std::ldexp(b.lower, k));
            CHECK(a.upper == std::ldexp(b.upper, k));
            CHECK(a.statistic == b.statistic);
            CHECK(a.p_value == b.p_value);
            CHECK(std::isfinite(a.upper));
        };
        check({1.0e308, 1.5e308, 1.2e308, 0.9e308, 1.1e308}, 1000);
        check({-1.0e308, 1.0e308, -0.5e308, 0.5e308, 0.25e308}, 1000);
        check({1e-200, 2e-200, 4e-200, 3e-200}, -700); // before: variance 0, "all values equal"
        const std::vector<double> wide{-1.7e308, 1.7e308};
        CHECK_THROWS_WITH_AS(heldout::naive_resampled_t(wide),
                             "heldout::naive_resampled_t: argument 'differences': arithmetic overflow: the interval's "
                             "bounds exceed the double range (values too large)",
                             heldout::input_error);
    }
    TEST_CASE("undefined and bad input") {
        const std::vector<double> same{0.1, 0.1, 0.1};
        CHECK_THROWS_WITH_AS(
            heldout::corrected_resampled_t(same, 9, 1),
            "heldout::corrected_resampled_t: undefined: all split values are equal (variance 0): the t statistic is "
            "undefined",
            heldout::undefined_error);
        const std::vector<double> one{0.1};
        CHECK_THROWS_AS(heldout::naive_resampled_t(one), heldout::undefined_error);
        const std::vector<double> none;
        CHECK_THROWS_WITH_AS(heldout::corrected_resampled_t(none, 9, 1),
                             "heldout::corrected_resampled_t: argument 'differences': empty input",
                             heldout::input_error);
        const std::vector<double> d{0.1, 0.2};
        CHECK_THROWS_WITH_AS(heldout::corrected_resampled_t(d, 0, 1),
                             "heldout::corrected_resampled_t: argument 'n_train': training size 0 is not positive",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::corrected_resampled_t(d, 9, -1),
                             "heldout::corrected_resampled_t: argument 'n_test': test size -1 is not positive",
                             heldout::input_error);
        const std::vector<double> nan{0.1, std::nan("")};
        CHECK_THROWS_WITH_AS(heldout::naive_resampled_t(nan),
                             "heldout::naive_resampled_t: argument 'differences': not finite (nan) at index 1",
                             heldout::input_error);
    }
}
