// Tests for heldout/compare/mcnemar.hpp: McNemar's test of two classifiers on one test set.
#include <heldout/compare/mcnemar.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cstdint>
#include <sstream>
#include <vector>

using heldout::mcnemar;
using heldout::mcnemar_test;

TEST_SUITE("compare/mcnemar") {
    TEST_CASE("table [[20, 10], [3, 17]]: b = 10, c = 3") {
        // Check values: R mcnemar.test / binom.test and scipy binomtest / chi2.sf, as collected
        // for McNemar (1947) and Edwards (1948); exact p = 756/8192 by hand:
        // P(X <= 3 | n = 13) = (1 + 13 + 78 + 286)/8192 = 378/8192, doubled.
        std::vector<int> truth, a, b;
        auto rows = [&](int count, bool a_right, bool b_right) {
            for (int i = 0; i < count; ++i) {
                truth.push_back(1);
                a.push_back(a_right ? 1 : 0);
                b.push_back(b_right ? 1 : 0);
            }
        };
        rows(20, true, true);
        rows(10, true, false);
        rows(3, false, true);
        rows(17, false, false);
        const auto ex = mcnemar_test(truth, a, b, mcnemar::exact);
        CHECK(ex.only_a_correct == 10);
        CHECK(ex.only_b_correct == 3);
        CHECK(ex.observations == 50);
        CHECK(ex.statistic == 10);
        CHECK(ex.p_value == doctest::Approx(756.0 / 8192).epsilon(1e-14));
        // mid-p = 756/8192 - P(X = 3) = (756 - 286)/8192 (Fagerland, Lydersen & Laake 2013).
        CHECK(mcnemar_test(truth, a, b, mcnemar::mid_p).p_value == doctest::Approx(470.0 / 8192).epsilon(1e-14));
        const auto chi = mcnemar_test(truth, a, b, mcnemar::chi_squared);
        CHECK(chi.statistic == doctest::Approx(49.0 / 13).epsilon(1e-15));
        CHECK(chi.p_value == doctest::Approx(0.0522036353).epsilon(1e-9)); // R pchisq / scipy chi2.sf
        const auto cc = mcnemar_test(truth, a, b, mcnemar::corrected);
        CHECK(cc.statistic == doctest::Approx(36.0 / 13).epsilon(1e-15));
        CHECK(cc.p_value == doctest::Approx(0.0960923295).epsilon(1e-9)); // R mcnemar.test(correct = TRUE)
    }
    TEST_CASE("live reference: scipy.stats.binomtest, binom and chi2 on small and huge counts") {
        heldout_test::reference_table ref("ref_compare");
        for (int i = 0; ref.has("mcnemar" + std::to_string(i) + ".counts"); ++i) {
            const std::string k = "mcnemar" + std::to_string(i) + ".";
            const auto c = ref.get(k + "counts");
            const auto b = static_cast<std::uint64_t>(c[0]), cc = static_cast<std::uint64_t>(c[1]);
            CAPTURE(b);
            CAPTURE(cc);
            if (b + cc == 0)
                continue;
            // scipy.stats.binomtest(b, b + c, 0.5).pvalue; Boost's ibeta-based tail at n = 1e6 too
            CHECK(heldout_test::close(mcnemar_test(b, cc, mcnemar::exact).p_value, ref.scalar(k + "exact"), 1e-11));
            // 2 binom.cdf(k - 1) + binom.pmf(k)
            CHECK(heldout_test::close(mcnemar_test(b, cc, mcnemar::mid_p).p_value, ref.scalar(k + "mid_p"), 1e-11));
            const auto chi = mcnemar_test(b, cc, mcnemar::chi_squared);
            CHECK(heldout_test::close(chi.statistic, ref.scalar(k + "chi"), 1e-14));
            CHECK(heldout_test::close(chi.p_value, ref.scalar(k + "chi_p"), 1e-11)); // scipy.stats.chi2.sf
            const auto cor = mcnemar_test(b, cc, mcnemar::corrected);
            CHECK(heldout_test::close(cor.statistic, ref.scalar(k + "cc"), 1e-14));
            CHECK(heldout_test::close(cor.p_value, ref.scalar(k + "cc_p"), 1e-11));
        }
        for (int i = 0; i < 3; ++i) {
            const std::string k = "mcnemar_labels" + std::to_string(i) + ".";
            const auto y = ref.get_as<int>(k + "truth");
            const auto a = ref.get_as<std::uint8_t>(k + "a");
            const auto b = ref.get_as<long>(k + "b");
            const auto r = mcnemar_test(y, a, b, mcnemar::exact);
            CHECK(r.only_a_correct == static_cast<std::uint64_t>(ref.get(k + "counts")[0])); // numpy counts
            CHECK(r.only_b_correct == static_cast<std::uint64_t>(ref.get(k + "counts")[1]));
            CHECK(heldout_test::close(r.p_value, ref.scalar(k + "exact"), 1e-11)); // scipy.stats.binomtest
        }
    }
    TEST_CASE("symmetry, ties and the no-discordance convention") {
        for (auto v : {mcnemar::exact, mcnemar::mid_p, mcnemar::chi_squared, mcnemar::corrected}) {
            CAPTURE(heldout::to_string(v));
            CHECK(mcnemar_test(7, 2, v).p_value == mcnemar_test(2, 7, v).p_value);
            CHECK(mcnemar_test(5, 5, v).p_value == doctest::Approx(1.0).epsilon(1e-15)); // b = c: no evidence
            const auto none = mcnemar_test(0, 0, v);                                     // documented: p = 1, 0
            CHECK(none.p_value == 1.0);
            CHECK(none.statistic == 0.0);
        }
        CHECK(mcnemar_test(4, 3, mcnemar::corrected).statistic == 0.0); // |b - c| - 1 = 0
        // b = 0, c = 7: exact p = 2 / 2^7, mid-p = 1 / 2^7 (binomial arithmetic by hand).
        CHECK(mcnemar_test(0, 7, mcnemar::exact).p_value == doctest::Approx(2.0 / 128).epsilon(1e-15));
        CHECK(mcnemar_test(0, 7, mcnemar::mid_p).p_value == doctest::Approx(1.0 / 128).epsilon(1e-15));
    }
    TEST_CASE("multiclass labels, byte labels, printing") {
        const std::vector<int> y{0, 1, 2, 2, 1};
        const std::vector<int> a{0, 1, 2, 0, 0}; // right on rows 0, 1, 2
        const std::vector<int> b{0, 2, 2, 2, 0}; // right on rows 0, 2, 3
        const auto r = mcnemar_test(y, a, b, mcnemar::exact);
        CHECK(r.only_a_correct == 1); // row 1
        CHECK(r.only_b_correct == 1); // row 3
        const std::vector<unsigned char> ab{1, 1}, bb{1, 0};
        CHECK(mcnemar_test(std::vector<std::uint8_t>{1, 0}, ab, bb, mcnemar::exact).only_b_correct == 1);
        std::ostringstream os;
        os << mcnemar_test(10, 3, mcnemar::mid_p);
        CHECK(os.str() == "McNemar mid-p: A only right 10, B only right 3, statistic 10, p = 0.057373");
    }
    TEST_CASE("bad input names the function, the argument and the index") {
        const std::vector<int> y{0, 1, 1}, a{0, 1, 1}, b{0, -1, 1}, s{0, 1};
        CHECK_THROWS_WITH_AS(mcnemar_test(y, a, s, mcnemar::exact),
                             "heldout::mcnemar_test: argument 'labels_b': size 2 differs from size 3 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(mcnemar_test(y, a, b, mcnemar::exact),
                             "heldout::mcnemar_test: argument 'labels_b': label -1 is negative at index 1",
                             heldout::input_error);
        const std::vector<int> e;
        CHECK_THROWS_WITH_AS(mcnemar_test(e, e, e, mcnemar::exact),
                             "heldout::mcnemar_test: argument 'truth': empty input", heldout::input_error);
    }
}
