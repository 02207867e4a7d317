// Tests for heldout/query/average_precision_at.hpp: AP at k within queries, tie-exact.
#include <heldout/query/average_precision_at.hpp>

#include "support/query_brute.hpp"
#include "support/query_cases.hpp"

#include <doctest/doctest.h>

#include <random>
#include <vector>

using heldout::by_query;
using heldout::evaluate;
using heldout::measure::average_precision_at;

TEST_SUITE("query/average_precision_at") {
    TEST_CASE("no ties: mean precision at the relevant positions, over min(k, R) or R") {
        // Relevant at positions 1, 3, 4 (R = 3): whole list (1 + 2/3 + 3/4) / 3 = 29/36.
        const std::vector<int> q(5, 1), rel{1, 0, 2, 1, 0};
        const std::vector<double> s{.9, .8, .7, .6, .5};
        CHECK(evaluate(average_precision_at{.k = 0}, by_query(q, rel), s) == doctest::Approx(29.0 / 36).epsilon(1e-15));
        // k = 2: only position 1 counts, divided by min(2, 3) = 2.
        CHECK(evaluate(average_precision_at{.k = 2}, by_query(q, rel), s) == doctest::Approx(0.5).epsilon(1e-15));
    }

    TEST_CASE("a tie across the cutoff (hand-enumerated orders of the block)") {
        // Scores [.9, .8, .8, .8, .1], relevance [2, 0, 3, 1, 0], R = 3. The block (positions 2-4) holds one
        // non-relevant N and two relevant R items: patterns NRR, RNR, RRN, each 2 of the 6 orders. Sums of
        // rel_i P@i over the whole list: 1 + 2/3 + 3/4, 1 + 1 + 3/4, 1 + 1 + 1; mean 49/18; AP = 49/54.
        const std::vector<int> q(5, 3), rel{2, 0, 3, 1, 0};
        const std::vector<double> s{.9, .8, .8, .8, .1};
        CHECK(evaluate(average_precision_at{.k = 0}, by_query(q, rel), s) == doctest::Approx(49.0 / 54).epsilon(1e-15));
        // k = 2 (the cutoff inside the block): positions 1, 2: 1 + (2/3) * 2/2 = 5/3, divided by min(2, 3) = 2.
        CHECK(evaluate(average_precision_at{.k = 2}, by_query(q, rel), s) == doctest::Approx(5.0 / 6).epsilon(1e-15));
    }

    TEST_CASE("all items tied: n = 4, r = 2: (1/2 + 1/3 + 5/18 + 1/4) / 2 = 49/72") {
        const std::vector<int> q(4, 1), rel{1, 0, 0, 2};
        const std::vector<double> s(4, 1.0);
        CHECK(evaluate(average_precision_at{.k = 0}, by_query(q, rel), s) == doctest::Approx(49.0 / 72).epsilon(1e-15));
    }

    TEST_CASE("no relevant item: undefined (skipped) or 0 on request") {
        const std::vector<int> q(2, 1), rel{0, 0};
        const std::vector<double> s{.3, .2};
        CHECK_THROWS_AS(evaluate(average_precision_at{}, by_query(q, rel), s), heldout::undefined_error);
        CHECK(evaluate(average_precision_at{.no_relevant = heldout::if_no_relevant::zero}, by_query(q, rel), s) == 0.0);
        CHECK(average_precision_at{.k = 0}.name() == "AP");
        CHECK(average_precision_at{.k = 5}.name() == "AP@5");
    }

    TEST_CASE("tie-exact = the mean over every order of the tied items (enumerated), 2000 random small queries") {
        std::mt19937 g(13);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 2000; ++t) {
            const auto c = heldout_test::random_small_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(0, c.scores.size() + 1)(g);
            if (B::relevant(c.rel) == 0) {
                CHECK(heldout_test::one_query(average_precision_at{.k = k}, c) == -1);
                continue;
            }
            const double want = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::average_precision(o, k); });
            CHECK(heldout_test::one_query(average_precision_at{.k = k}, c) == doctest::Approx(want).epsilon(1e-13));
        }
    }
    TEST_CASE("tie-exact on longer queries (selection of the head), 1500 random queries of 10-40 items") {
        std::mt19937 g(97);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 1500; ++t) {
            const auto c = heldout_test::random_long_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(1, 12)(g);
            if (B::relevant(c.rel) == 0)
                continue;
            const double want = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::average_precision(o, k); });
            CHECK(heldout_test::one_query(average_precision_at{.k = k}, c) == doctest::Approx(want).epsilon(1e-13));
        }
    }
}
