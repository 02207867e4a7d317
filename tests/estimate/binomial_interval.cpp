// Tests for heldout/estimate/binomial_interval.hpp: Wilson, Wilson-cc, Clopper-Pearson,
// Agresti-Coull intervals for a proportion.
#include <heldout/estimate/binomial_interval.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cstddef>
#include <cstdint>
#include <string>

using heldout::agresti_coull_interval;
using heldout::clopper_pearson_interval;
using heldout::wilson_cc_interval;
using heldout::wilson_interval;

TEST_SUITE("estimate/binomial_interval") {
    TEST_CASE("Wilson 95% for 3/10, arithmetic visible") {
        // z = 1.959963984540054 (R qnorm, R 4.2.2 qnorm/qt, mpmath agrees); p = 0.3;
        // centre = (2*10*0.3 + z^2)/(2(10 + z^2)), half = z/(2(10 + z^2)) sqrt(4*10*0.3*0.7 + z^2).
        const double z = 1.959963984540054;
        const double centre = (6.0 + z * z) / (2 * (10 + z * z));
        const double half = z / (2 * (10 + z * z)) * std::sqrt(8.4 + z * z);
        const auto w = wilson_interval(3, 10);
        CHECK(w.lower == doctest::Approx(centre - half).epsilon(1e-14));
        CHECK(w.upper == doctest::Approx(centre + half).epsilon(1e-14));
        CHECK(w.estimate == 0.3);
        CHECK(w.level == 0.95);
        // The same interval written as in Wilson (1927).
        const double p = 0.3, n = 10;
        const double c2 = (p + z * z / (2 * n)) / (1 + z * z / n);
        const double h2 = z * std::sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / (1 + z * z / n);
        CHECK(w.lower == doctest::Approx(c2 - h2).epsilon(1e-14));
    }
    TEST_CASE("k = 0 and k = n give exact 0 and 1 (no -1e-17), every method") {
        for (std::size_t n : {1u, 7u, 20u, 1000u}) {
            CHECK(wilson_interval(0u, n).lower == 0.0);
            CHECK(wilson_interval(n, n).upper == 1.0);
            CHECK(wilson_cc_interval(0u, n).lower == 0.0);
            CHECK(wilson_cc_interval(n, n).upper == 1.0);
            CHECK(clopper_pearson_interval(0u, n).lower == 0.0);
            CHECK(clopper_pearson_interval(n, n).upper == 1.0);
            CHECK(agresti_coull_interval(0u, n).lower == 0.0); // truncated (Agresti-Coull leaves [0,1] at 0/20)
        }
    }
    TEST_CASE("Clopper-Pearson 0/n puts a/2 in the upper tail: U = 1 - (a/2)^(1/n)") {
        // Beta^-1(1 - a/2; 1, n) = 1 - (a/2)^(1/n) in closed form (Clopper & Pearson 1934, beta form
        // in Wilson 1927; Clopper & Pearson 1934): each tail gets a/2 even at k = 0.
        CHECK(clopper_pearson_interval(0, 10).upper == doctest::Approx(1 - std::pow(0.025, 0.1)).epsilon(1e-13));
        CHECK(clopper_pearson_interval(10, 10).lower == doctest::Approx(std::pow(0.025, 0.1)).epsilon(1e-13));
    }
    TEST_CASE("Agresti-Coull is truncated to [0, 1] at 0/20 and 1/29 (Agresti & Coull 1998)") {
        // Untruncated lower bounds are negative there (Agresti & Coull 1998 formula).
        const double z = 1.959963984540054;
        for (auto [k, n] : {std::pair{0, 20}, std::pair{1, 29}}) {
            const double nt = n + z * z, pt = (k + z * z / 2) / nt;
            CHECK(pt - z * std::sqrt(pt * (1 - pt) / nt) < 0);
            CHECK(agresti_coull_interval(k, n).lower == 0.0);
        }
    }
    TEST_CASE("live reference: scipy.stats.binomtest(k, n).proportion_ci on a grid with k = 0 and k = n") {
        heldout_test::reference_table ref("ref_intervals");
        const auto k = ref.get("binom.k"), n = ref.get("binom.n"), lev = ref.get("binom.level");
        const auto& wl = ref.get("binom.wilson_lo");
        const auto& wh = ref.get("binom.wilson_hi");
        const auto& el = ref.get("binom.exact_lo");
        const auto& eh = ref.get("binom.exact_hi");
        const auto& cl = ref.get("binom.wilsoncc_lo");
        const auto& ch = ref.get("binom.wilsoncc_hi");
        const auto& bl = ref.get("binom.beta_lo");
        const auto& bh = ref.get("binom.beta_hi");
        const auto& al = ref.get("binom.ac_lo");
        const auto& ah = ref.get("binom.ac_hi");
        REQUIRE(k.size() > 200);
        for (std::size_t i = 0; i < k.size(); ++i) {
            const auto kk = static_cast<std::int64_t>(k[i]);
            const auto nn = static_cast<std::int64_t>(n[i]);
            CAPTURE(kk);
            CAPTURE(nn);
            CAPTURE(lev[i]);
            const auto w = wilson_interval(kk, nn, lev[i]);
            CHECK(heldout_test::close(w.lower, wl[i], 1e-12, 1e-15)); // scipy method='wilson' (clipped)
            CHECK(heldout_test::close(w.upper, wh[i], 1e-12, 1e-15));
            const auto e = clopper_pearson_interval(kk, nn, lev[i]);
            // scipy method='exact' is a root search (~1e-12 absolute); scipy.stats.beta.ppf is the
            // beta-quantile form of Clopper & Pearson (1934).
            CHECK(std::abs(e.lower - el[i]) <= 2e-12);
            CHECK(std::abs(e.upper - eh[i]) <= 2e-12);
            CHECK(heldout_test::close(e.lower, bl[i], 1e-12, 1e-300));
            CHECK(heldout_test::close(e.upper, bh[i], 1e-12, 1e-300));
            const auto c = wilson_cc_interval(kk, nn, lev[i]);
            CHECK(heldout_test::close(c.lower, cl[i], 1e-12, 1e-15)); // scipy method='wilsoncc' (clipped)
            CHECK(heldout_test::close(c.upper, ch[i], 1e-12, 1e-15));
            const auto a = agresti_coull_interval(kk, nn, lev[i]);
            CHECK(heldout_test::close(a.lower, al[i], 1e-12, 1e-15)); // Agresti & Coull formula in numpy
            CHECK(heldout_test::close(a.upper, ah[i], 1e-12, 1e-15));
            CHECK(w.lower <= w.upper);
            CHECK(c.lower <= w.lower + 1e-15); // the continuity correction only widens
            CHECK(c.upper >= w.upper - 1e-15);
        }
    }
    TEST_CASE("bad input names the function and the argument") {
        CHECK_THROWS_WITH_AS(wilson_interval(3, 0), "heldout::wilson_interval: argument 'n': no observations (n = 0)",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(wilson_interval(-1, 5), "heldout::wilson_interval: argument 'k': negative count -1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(clopper_pearson_interval(6, 5),
                             "heldout::clopper_pearson_interval: argument 'k': count 6 exceeds n = 5",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(agresti_coull_interval(1, -5),
                             "heldout::agresti_coull_interval: argument 'n': negative count -5", heldout::input_error);
        CHECK_THROWS_WITH_AS(wilson_cc_interval(1, 5, 1.0),
                             "heldout::wilson_cc_interval: argument 'level': confidence level 1 outside (0, 1)",
                             heldout::input_error);
        CHECK_THROWS_AS(wilson_interval(1, 5, std::nan("")), heldout::input_error);
    }
}
