// Tests for heldout/compare/friedman.hpp: Friedman, Iman–Davenport, Nemenyi (Demšar 2006).
#include <heldout/compare/friedman.hpp>

#include "support/reference.hpp"

#include <Eigen/Core>
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <sstream>
#include <vector>

using heldout::direction;
using heldout::friedman_test;
using heldout::nemenyi_critical_difference;

namespace {
Eigen::MatrixXd demsar_example() {
    Eigen::MatrixXd acc(6, 3);
    acc << .80, .82, .79, .75, .78, .76, .90, .91, .88, .66, .70, .70, .85, .84, .83, .72, .75, .71;
    return acc;
}
} // namespace

TEST_SUITE("compare/friedman") {
    TEST_CASE("6 data sets x 3 models with one tie") {
        // Check values: scipy.stats.friedmanchisquare and R friedman.test (tie-corrected
        // chi-squared 5.826086956522, p = 0.0543101862116); Demšar (2006) formulas for the
        // uncorrected chi2_F = 5.583333333 and F_F = 4.35064935065, df (2, 10), p = 0.0437160753033.
        const auto f = friedman_test(demsar_example(), direction::higher_is_better, {"A", "B", "C"});
        REQUIRE(f.average_ranks.size() == 3);
        // Ranks by hand: rows give (2,1,3) (3,1,2) (2,1,3) (3,1.5,1.5) (1,2,3) (2,1,3).
        CHECK(f.average_ranks[0] == doctest::Approx(13.0 / 6).epsilon(1e-15));
        CHECK(f.average_ranks[1] == doctest::Approx(7.5 / 6).epsilon(1e-15));
        CHECK(f.average_ranks[2] == doctest::Approx(15.5 / 6).epsilon(1e-15));
        CHECK(heldout_test::close(f.chi_squared, 5.583333333333333, 1e-14));
        CHECK(heldout_test::close(f.chi_squared_corrected, 5.826086956522, 1e-12));
        CHECK(heldout_test::close(f.chi_squared_corrected_p_value, 0.0543101862116, 1e-10));
        CHECK(heldout_test::close(f.tie_correction, 1 - 6.0 / 144, 1e-15)); // one tie of 2: 2^3 - 2 = 6
        CHECK(heldout_test::close(f.f_statistic, 4.35064935065, 1e-11));
        CHECK(f.f_df1 == 2);
        CHECK(f.f_df2 == 10);
        CHECK(heldout_test::close(f.f_p_value, 0.0437160753033, 1e-10));
        // Nemenyi CD at alpha = 0.05, k = 3, N = 6: 1.35313616533 (R qtukey(0.95, 3, Inf)/sqrt(2)
        // times sqrt(12/36); R's qtukey is good to ~1e-10, so 1e-8 here).
        const double cd = nemenyi_critical_difference(3, 6, 0.05);
        CHECK(heldout_test::close(cd, 1.35313616533, 1e-8));
        const auto groups = heldout::nemenyi_groups(f.average_ranks, cd);
        REQUIRE(groups.size() == 1); // the ranks span 1.333 < CD: one group B, A, C
        CHECK(groups[0] == std::vector<std::size_t>{1, 0, 2});
    }
    TEST_CASE("direction: lower is better reverses the ranks") {
        const auto hi = friedman_test(demsar_example(), direction::higher_is_better);
        const auto lo = friedman_test(demsar_example(), direction::lower_is_better);
        for (std::size_t j = 0; j < 3; ++j)
            CHECK(lo.average_ranks[j] == doctest::Approx(4 - hi.average_ranks[j]));
        CHECK(lo.chi_squared == doctest::Approx(hi.chi_squared));
        CHECK(hi.names == std::vector<std::string>{"model 1", "model 2", "model 3"});
    }
    TEST_CASE("q_alpha for k = 2..10 against R qtukey(p, k, Inf) / sqrt(2)") {
        // Demšar (2006) Table 5 values as computed with R 4.2.2 qtukey (6 decimals shown there, so 1e-6).
        const double q05[] = {1.959964, 2.343701, 2.569032, 2.727774, 2.849705, 2.948320, 3.030879, 3.101730, 3.163684};
        const double q10[] = {1.644854, 2.052293, 2.291341, 2.459516, 2.588521, 2.692732, 2.779884, 2.854606, 2.919889};
        for (std::size_t k = 2; k <= 10; ++k) {
            CAPTURE(k);
            CHECK(std::abs(heldout::studentized_range_quantile(k, 0.95) / std::sqrt(2.0) - q05[k - 2]) < 6e-7);
            CHECK(std::abs(heldout::studentized_range_quantile(k, 0.90) / std::sqrt(2.0) - q10[k - 2]) < 6e-7);
        }
        // k = 2 in closed form: the range of two standard normals is |Z1 - Z2| ~ sqrt(2)|Z|, so
        // q / sqrt(2) = z_0.975 = 1.959963984540054 (R qnorm).
        CHECK(heldout_test::close(heldout::studentized_range_quantile(2, 0.95) / std::sqrt(2.0), 1.959963984540054,
                                  1e-13));
    }
    TEST_CASE("live reference: scipy.stats.studentized_range (df = inf) and norm for Bonferroni-Dunn") {
        heldout_test::reference_table ref("ref_compare");
        const auto ks = ref.get("qrange.k");
        for (const char* p : {"0.9", "0.95", "0.99"}) {
            const auto& q = ref.get(std::string("qrange.") + p);
            for (std::size_t i = 0; i < ks.size(); ++i) {
                CAPTURE(ks[i]);
                CAPTURE(p);
                // scipy.stats.studentized_range.ppf(p, k, inf); both sides integrate numerically.
                CHECK(heldout_test::close(
                    heldout::studentized_range_quantile(static_cast<std::size_t>(ks[i]), std::stod(p)), q[i], 1e-10));
            }
        }
        for (int k : {2, 3, 5, 10})
            for (const char* a : {"0.05", "0.1"}) {
                // scipy.stats.norm.isf(alpha / (2 (k - 1))) * sqrt(k (k+1) / (6 N)) with N = 12
                const double want = ref.scalar("bonferroni_dunn." + std::to_string(k) + "." + a);
                CHECK(heldout_test::close(heldout::bonferroni_dunn_critical_difference(k, 12, std::stod(a)), want,
                                          1e-13));
            }
    }
    TEST_CASE("live reference: scipy.stats.friedmanchisquare and rankdata on random tables with ties") {
        heldout_test::reference_table ref("ref_compare");
        for (int i = 0; i < 6; ++i) {
            const std::string k = "friedman" + std::to_string(i) + ".";
            const auto shape = ref.get(k + "shape");
            const auto& v = ref.get(k + "values");
            const auto rows = static_cast<Eigen::Index>(shape[0]), cols = static_cast<Eigen::Index>(shape[1]);
            const Eigen::MatrixXd x =
                Eigen::Map<const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>>(v.data(), rows,
                                                                                                         cols);
            const auto hi = friedman_test(x, direction::higher_is_better);
            const auto lo = friedman_test(x, direction::lower_is_better);
            const auto& rh = ref.get(k + "ranks_higher"); // scipy.stats.rankdata(-row), midranks
            const auto& rl = ref.get(k + "ranks_lower");  // scipy.stats.rankdata(row)
            for (Eigen::Index j = 0; j < cols; ++j) {
                CHECK(heldout_test::close(hi.average_ranks[static_cast<std::size_t>(j)],
                                          rh[static_cast<std::size_t>(j)], 1e-14));
                CHECK(heldout_test::close(lo.average_ranks[static_cast<std::size_t>(j)],
                                          rl[static_cast<std::size_t>(j)], 1e-14));
            }
            CHECK(heldout_test::close(hi.chi_squared, ref.scalar(k + "chi"), 1e-12));           // Demšar's formula
            CHECK(heldout_test::close(hi.chi_squared_p_value, ref.scalar(k + "chi_p"), 1e-11)); // scipy.stats.chi2.sf
            CHECK(heldout_test::close(hi.chi_squared_corrected, ref.scalar(k + "chi_corrected"), 1e-12));
            CHECK(heldout_test::close(hi.chi_squared_corrected_p_value, ref.scalar(k + "chi_corrected_p"), 1e-11));
            CHECK(heldout_test::close(hi.f_statistic, ref.scalar(k + "ff"), 1e-12)); // Iman & Davenport 1980
            CHECK(heldout_test::close(hi.f_p_value, ref.scalar(k + "ff_p"), 1e-11)); // scipy.stats.f.sf
            // A row of equal values contributes midrank (k+1)/2 to every model and is caught by the tie term.
        }
    }
    TEST_CASE("perfect agreement and total ties") {
        Eigen::MatrixXd same(4, 3);
        same << 3, 2, 1, 3, 2, 1, 30, 20, 10, 0.3, 0.2, 0.1;
        const auto f = friedman_test(same, direction::higher_is_better);
        CHECK(f.chi_squared == doctest::Approx(8.0)); // maximum N (k - 1)
        CHECK(std::isinf(f.f_statistic));             // documented limit: F_F = +inf, p = 0
        CHECK(f.f_p_value == 0.0);
        const Eigen::MatrixXd flat = Eigen::MatrixXd::Constant(3, 4, 0.7);
        CHECK_THROWS_WITH_AS(friedman_test(flat, direction::higher_is_better),
                             "heldout::friedman_test: undefined: every model ties with every other on every data set: "
                             "nothing to rank",
                             heldout::undefined_error);
    }
    TEST_CASE("groups of a critical-difference diagram") {
        // ranks 1, 1.5, 3, 3.2, 5 with CD 1.0: {0, 1} and {2, 3}; model 4 stands alone.
        const std::vector<double> r{1.0, 1.5, 3.0, 3.2, 5.0};
        const auto g = heldout::nemenyi_groups(r, 1.0);
        REQUIRE(g.size() == 2);
        CHECK(g[0] == std::vector<std::size_t>{0, 1});
        CHECK(g[1] == std::vector<std::size_t>{2, 3});
        // Overlapping runs: 1, 1.6, 2.2 with CD 1.0 -> {0, 1} and {1, 2}; a difference equal to the
        // CD counts as significant (Demšar: "differ by at least the critical difference").
        const auto h = heldout::nemenyi_groups(std::vector<double>{2.2, 1.0, 1.6}, 1.0);
        REQUIRE(h.size() == 2);
        CHECK(h[0] == std::vector<std::size_t>{1, 2});
        CHECK(h[1] == std::vector<std::size_t>{2, 0});
        CHECK(heldout::nemenyi_groups(std::vector<double>{1.0, 2.0}, 1.0).empty());
    }
    TEST_CASE("the table printer") {
        const auto f = friedman_test(demsar_example(), direction::higher_is_better, {"A", "B", "C"});
        std::ostringstream os;
        heldout::print_rank_table(os, f, 0.05);
        CHECK(os.str() == "Average ranks over 6 data sets (1 = best; higher values are better)\n"
                          "  model  rank\n"
                          "  B      1.250\n"
                          "  A      2.167\n"
                          "  C      2.583\n"
                          "Friedman chi-squared 5.583 (df 2), p = 0.06132; tie-corrected 5.826, p = 0.05431\n"
                          "Iman-Davenport F 4.351 (df 2, 10), p = 0.04372\n"
                          "Nemenyi critical difference at alpha = 0.05: 1.353\n"
                          "Not told apart: {B, A, C}\n");
    }
    TEST_CASE("bad input") {
        Eigen::MatrixXd x = demsar_example();
        x(2, 1) = std::numeric_limits<double>::quiet_NaN();
        CHECK_THROWS_WITH_AS(friedman_test(x, direction::higher_is_better),
                             "heldout::friedman_test: argument 'results': not finite (nan) at data set 2, model 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(friedman_test(Eigen::MatrixXd::Zero(1, 3), direction::higher_is_better),
                             "heldout::friedman_test: argument 'results': need at least 2 data sets (rows), got 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(friedman_test(Eigen::MatrixXd::Zero(3, 1), direction::higher_is_better),
                             "heldout::friedman_test: argument 'results': need at least 2 models (columns), got 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(friedman_test(demsar_example(), direction::higher_is_better, {"A", "B"}),
                             "heldout::friedman_test: argument 'names': 2 names for 3 models", heldout::input_error);
        CHECK_THROWS_WITH_AS(nemenyi_critical_difference(3, 6, 0.0),
                             "heldout::nemenyi_critical_difference: argument 'alpha': must lie in (0, 1), got 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(nemenyi_critical_difference(1, 6, 0.05),
                             "heldout::nemenyi_critical_difference: argument 'models': need at least 2, got 1",
                             heldout::input_error);
    }
}
