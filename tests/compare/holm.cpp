// Tests for heldout/compare/holm.hpp: Holm's step-down adjustment.
#include <heldout/compare/holm.hpp>

#include "support/reference.hpp"

#include <Eigen/Core>
#include <doctest/doctest.h>

#include <limits>
#include <vector>

using heldout::holm_adjust;

TEST_SUITE("compare/holm") {
    TEST_CASE("worked example in input order") {
        // R p.adjust(c(.01, .04, .03, .005), "holm") = 0.03 0.06 0.06 0.02 (Holm 1979): sorted
        // .005, .01, .03, .04 times 4, 3, 2, 1 = .02, .03, .06, .04 -> running max .02 .03 .06 .06.
        const auto adj = holm_adjust(std::vector<double>{0.01, 0.04, 0.03, 0.005});
        REQUIRE(adj.size() == 4);
        CHECK(adj[0] == doctest::Approx(0.03).epsilon(1e-15));
        CHECK(adj[1] == doctest::Approx(0.06).epsilon(1e-15));
        CHECK(adj[2] == doctest::Approx(0.06).epsilon(1e-15));
        CHECK(adj[3] == doctest::Approx(0.02).epsilon(1e-15));
    }
    TEST_CASE("capped at 1, one p-value unchanged, Eigen input") {
        CHECK(holm_adjust(std::vector<double>{0.3}) == std::vector<double>{0.3});
        const auto adj = holm_adjust(std::vector<double>{0.6, 0.5});
        CHECK(adj == std::vector<double>{1.0, 1.0});
        Eigen::VectorXd p(3);
        p << 0.02, 0.01, 0.9;
        const auto e = holm_adjust(p); // sorted .01 .02 .9 times 3 2 1 = .03 .04 .9
        CHECK(e[0] == doctest::Approx(0.04));
        CHECK(e[1] == doctest::Approx(0.03));
        CHECK(e[2] == doctest::Approx(0.9));
    }
    TEST_CASE("live reference: the step-down formula in numpy, with ties") {
        heldout_test::reference_table ref("ref_compare");
        for (int i = 0; i < 5; ++i) {
            const std::string k = "holm" + std::to_string(i) + ".";
            const auto adj = holm_adjust(ref.get(k + "p"));
            const auto& want = ref.get(k + "adjusted"); // numpy maximum.accumulate of (m - j + 1) p_(j), Holm 1979
            REQUIRE(adj.size() == want.size());
            for (std::size_t j = 0; j < adj.size(); ++j)
                CHECK(heldout_test::close(adj[j], want[j], 1e-15));
        }
    }
    TEST_CASE("bad input") {
        CHECK_THROWS_WITH_AS(holm_adjust(std::vector<double>{0.1, 1.5}),
                             "heldout::holm_adjust: argument 'p_values': probability 1.5 outside [0, 1] at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(holm_adjust(std::vector<double>{std::numeric_limits<double>::quiet_NaN()}),
                             "heldout::holm_adjust: argument 'p_values': not finite (nan) at index 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(holm_adjust(std::vector<double>{}),
                             "heldout::holm_adjust: argument 'p_values': empty input", heldout::input_error);
    }
}
