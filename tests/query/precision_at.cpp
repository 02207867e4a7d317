// Tests for heldout/query/precision_at.hpp: precision and recall at k within queries, tie-exact.
#include <heldout/query/precision_at.hpp>

#include "support/query_brute.hpp"
#include "support/query_cases.hpp"

#include <doctest/doctest.h>

#include <random>
#include <vector>

using heldout::by_query;
using heldout::evaluate;
using heldout::measure::precision_at;
using heldout::measure::recall_at;

TEST_SUITE("query/precision_at") {
    TEST_CASE("a tie across the cutoff: the straddling block counts its share of relevant items") {
        // Scores [.9, .8, .8, .8, .1], relevance [2, 0, 3, 1, 0]: R = 3. Top 2 = the first item (relevant)
        // and one of the tied three (2 of them relevant): E[# relevant in top 2] = 1 + 2/3 = 5/3.
        const std::vector<int> q(5, 1), rel{2, 0, 3, 1, 0};
        const std::vector<double> s{.9, .8, .8, .8, .1};
        CHECK(evaluate(precision_at{.k = 2}, by_query(q, rel), s) == doctest::Approx(5.0 / 6).epsilon(1e-15));
        CHECK(evaluate(recall_at{.k = 2}, by_query(q, rel), s) == doctest::Approx(5.0 / 9).epsilon(1e-15));
        // k = 4 covers the block: 3 relevant.
        CHECK(evaluate(precision_at{.k = 4}, by_query(q, rel), s) == doctest::Approx(0.75).epsilon(1e-15));
        CHECK(evaluate(recall_at{.k = 4}, by_query(q, rel), s) == 1.0);
        // k = 10 > n = 5: P@10 divides by k (methods.md §17 convention), R@10 = 1.
        CHECK(evaluate(precision_at{.k = 10}, by_query(q, rel), s) == doctest::Approx(0.3).epsilon(1e-15));
        CHECK(evaluate(recall_at{.k = 10}, by_query(q, rel), s) == 1.0);
    }

    TEST_CASE("all items tied: the top k holds k/n of the relevant items on average") {
        const std::vector<int> q(4, 1), rel{1, 0, 0, 2};
        const std::vector<float> s(4, 0.25f);
        CHECK(evaluate(precision_at{.k = 1}, by_query(q, rel), s) == doctest::Approx(0.5).epsilon(1e-15));
        CHECK(evaluate(recall_at{.k = 1}, by_query(q, rel), s) == doctest::Approx(0.25).epsilon(1e-15));
        CHECK(evaluate(recall_at{.k = 3}, by_query(q, rel), s) == doctest::Approx(0.75).epsilon(1e-15));
    }

    TEST_CASE("no relevant item: P@k is 0, R@k undefined (skipped) or 0 on request") {
        const std::vector<int> q(3, 1), rel{0, 0, 0};
        const std::vector<double> s{.3, .2, .1};
        CHECK(evaluate(precision_at{.k = 2}, by_query(q, rel), s) == 0.0);
        CHECK_THROWS_AS(evaluate(recall_at{.k = 2}, by_query(q, rel), s), heldout::undefined_error);
        CHECK(evaluate(recall_at{.k = 2, .no_relevant = heldout::if_no_relevant::zero}, by_query(q, rel), s) == 0.0);
    }

    TEST_CASE("k = 0 is refused, naming k") {
        const std::vector<int> q(2, 1), rel{1, 0};
        const std::vector<double> s{.3, .2};
        try {
            (void)evaluate(precision_at{.k = 0}, by_query(q, rel), s);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(e.argument() == "k");
            CHECK(e.who() == "measure P@0");
        }
        CHECK_THROWS_AS(evaluate(recall_at{.k = 0}, by_query(q, rel), s), heldout::input_error);
        CHECK(precision_at{.k = 5}.name() == "P@5");
        CHECK(recall_at{.k = 5, .no_relevant = heldout::if_no_relevant::zero}.name() == "R@5 (no relevant item = 0)");
    }

    TEST_CASE("tie-exact = the mean over every order of the tied items (enumerated), 2000 random small queries") {
        std::mt19937 g(7);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 2000; ++t) {
            const auto c = heldout_test::random_small_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(1, c.scores.size() + 2)(g);
            const double p = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::precision(o, k); });
            CHECK(heldout_test::one_query(precision_at{.k = k}, c) == doctest::Approx(p).epsilon(1e-13));
            if (B::relevant(c.rel) == 0) {
                CHECK(heldout_test::one_query(recall_at{.k = k}, c) == -1);
                continue;
            }
            const double r = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::recall(o, k); });
            CHECK(heldout_test::one_query(recall_at{.k = k}, c) == doctest::Approx(r).epsilon(1e-13));
        }
    }
    TEST_CASE("tie-exact on longer queries (selection of the head), 1500 random queries of 10-40 items") {
        std::mt19937 g(98);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 1500; ++t) {
            const auto c = heldout_test::random_long_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(1, 12)(g);
            const double want = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::precision(o, k); });
            CHECK(heldout_test::one_query(precision_at{.k = k}, c) == doctest::Approx(want).epsilon(1e-13));
        }
    }
}
