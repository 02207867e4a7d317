// Tests for heldout/query/reciprocal_rank.hpp: reciprocal rank within queries, tie-exact.
#include <heldout/query/reciprocal_rank.hpp>

#include "support/query_brute.hpp"
#include "support/query_cases.hpp"

#include <doctest/doctest.h>

#include <random>
#include <vector>

using heldout::by_query;
using heldout::evaluate;
using heldout::measure::reciprocal_rank;

TEST_SUITE("query/reciprocal_rank") {
    TEST_CASE("no ties: 1 / position of the first relevant item") {
        const std::vector<int> q(4, 2), rel{0, 0, 1, 3};
        const std::vector<double> s{.9, .8, .7, .6};
        CHECK(evaluate(reciprocal_rank{}, by_query(q, rel), s) == doctest::Approx(1.0 / 3).epsilon(1e-15));
    }

    TEST_CASE("the first relevant item in a tie block: hypergeometric position within the block") {
        // Scores [.9, .8, .8, .8, .1], relevance [0, 0, 3, 1, 0]: the block starts at position 2 with
        // n = 3 items, r = 2 relevant. P(X = 0) = 2/3, P(X = 1) = 1/3: E[RR] = (2/3)/2 + (1/3)/3 = 4/9.
        // (By hand over the 6 orders of the block: 4 start with a relevant item, RR 1/2; 2 do not, RR 1/3.)
        const std::vector<int> q(5, 1), rel{0, 0, 3, 1, 0};
        const std::vector<double> s{.9, .8, .8, .8, .1};
        CHECK(evaluate(reciprocal_rank{}, by_query(q, rel), s) == doctest::Approx(4.0 / 9).epsilon(1e-15));
    }

    TEST_CASE("all items tied: n = 4, r = 2 gives 1/2 + (1/3)(1/2) + (1/6)(1/3) = 13/18") {
        const std::vector<int> q(4, 1), rel{1, 0, 0, 2};
        const std::vector<double> s(4, 0.0);
        CHECK(evaluate(reciprocal_rank{}, by_query(q, rel), s) == doctest::Approx(13.0 / 18).epsilon(1e-15));
    }

    TEST_CASE("no relevant item: undefined (skipped) or 0 on request") {
        const std::vector<int> q(2, 1), rel{0, 0};
        const std::vector<double> s{.3, .2};
        CHECK_THROWS_AS(evaluate(reciprocal_rank{}, by_query(q, rel), s), heldout::undefined_error);
        CHECK(evaluate(reciprocal_rank{.no_relevant = heldout::if_no_relevant::zero}, by_query(q, rel), s) == 0.0);
        CHECK(reciprocal_rank{}.name() == "reciprocal rank");
    }

    TEST_CASE("tie-exact = the mean over every order of the tied items (enumerated), 2000 random small queries") {
        std::mt19937 g(11);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 2000; ++t) {
            const auto c = heldout_test::random_small_query(g);
            if (B::relevant(c.rel) == 0) {
                CHECK(heldout_test::one_query(reciprocal_rank{}, c) == -1);
                continue;
            }
            const double want = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::reciprocal_rank(o); });
            CHECK(heldout_test::one_query(reciprocal_rank{}, c) == doctest::Approx(want).epsilon(1e-13));
        }
    }
}
