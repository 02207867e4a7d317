// Tests for heldout/query/ndcg.hpp: DCG@k and NDCG@k within queries, tie-exact.
#include <heldout/query/gains.hpp>
#include <heldout/query/ndcg.hpp>

#include "support/query_brute.hpp"
#include "support/query_cases.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <vector>

using heldout::by_query;
using heldout::evaluate;
using heldout::measure::dcg;
using heldout::measure::ndcg;

TEST_SUITE("query/ndcg") {
    TEST_CASE("methods.md §17 check [SELF]: relevances [3,2,3,0,1,2] in score order, exponential gain") {
        // Gains 2^rel - 1 = [7,3,7,0,1,3]; DCG@6 = 7/1 + 3/log2 3 + 7/2 + 0 + 1/log2 6 + 3/log2 7.
        const std::vector<int> q(6, 1), rel{3, 2, 3, 0, 1, 2};
        const std::vector<double> s{6, 5, 4, 3, 2, 1};
        const double by_hand = 7 + 3 / std::log2(3.0) + 7.0 / 2 + 1 / std::log2(6.0) + 3 / std::log2(7.0);
        CHECK(by_hand == doctest::Approx(13.848263629273).epsilon(1e-12));
        CHECK(evaluate(dcg{.k = 6}, by_query(q, rel), s) == doctest::Approx(13.848263629273).epsilon(1e-12));
        CHECK(evaluate(dcg{.k = 0}, by_query(q, rel), s) == doctest::Approx(13.848263629273).epsilon(1e-12));
        // IDCG@6 from [3,3,2,2,1,0] = 14.595390756455; NDCG@6 = 0.948810748568 (methods.md §17).
        CHECK(evaluate(ndcg{.k = 6}, by_query(q, rel), s) == doctest::Approx(0.948810748568).epsilon(1e-11));
        // Input order does not matter: reversed rows, same scores.
        const std::vector<int> rr(rel.rbegin(), rel.rend());
        const std::vector<double> sr(s.rbegin(), s.rend());
        CHECK(evaluate(ndcg{.k = 6}, by_query(q, rr), sr) == doctest::Approx(0.948810748568).epsilon(1e-11));
    }

    TEST_CASE("a tie across the cutoff: the straddling block contributes its mean gain at the positions inside") {
        // Scores [.9, .8, .8, .8, .1], relevance [2, 0, 3, 1, 0], k = 2, linear gain. Position 1: gain 2.
        // Position 2 holds one of the tied three, mean gain (0 + 3 + 1)/3 = 4/3, discount 1/log2 3.
        // E[DCG@2] = 2 + (4/3)/log2 3; IDCG@2 = 3 + 2/log2 3; their ratio is exactly 2/3.
        const std::vector<int> q(5, 4), rel{2, 0, 3, 1, 0};
        const std::vector<double> s{.9, .8, .8, .8, .1};
        const double c = 1 / std::log2(3.0);
        CHECK(evaluate(dcg{.k = 2, .gain = heldout::gain::linear}, by_query(q, rel), s) ==
              doctest::Approx(2 + 4.0 / 3 * c).epsilon(1e-15));
        CHECK(evaluate(ndcg{.k = 2, .gain = heldout::gain::linear}, by_query(q, rel), s) ==
              doctest::Approx(2.0 / 3).epsilon(1e-15));
        // Exponential gains [3, 0, 7, 1, 0]: E[DCG@2] = 3 + (8/3)/log2 3, IDCG@2 = 7 + 3/log2 3.
        CHECK(evaluate(ndcg{.k = 2}, by_query(q, rel), s) ==
              doctest::Approx((3 + 8.0 / 3 * c) / (7 + 3 * c)).epsilon(1e-15));
    }

    TEST_CASE("all items tied: every position gets the mean gain") {
        // Relevance [1, 0, 0, 2], all scores 0.5, linear gain, whole list: E[DCG] = (3/4) Σ_{i=1..4} 1/log2(1+i).
        const std::vector<int> q(4, 0), rel{1, 0, 0, 2};
        const std::vector<float> s(4, 0.5f);
        const double sum_disc = 1 + 1 / std::log2(3.0) + 0.5 + 1 / std::log2(5.0);
        CHECK(evaluate(dcg{.k = 0, .gain = heldout::gain::linear}, by_query(q, rel), s) ==
              doctest::Approx(0.75 * sum_disc).epsilon(1e-15));
        // IDCG = 2 + 1/log2 3.
        CHECK(evaluate(ndcg{.k = 0, .gain = heldout::gain::linear}, by_query(q, rel), s) ==
              doctest::Approx(0.75 * sum_disc / (2 + 1 / std::log2(3.0))).epsilon(1e-15));
    }

    TEST_CASE("no relevant item: NDCG undefined (skipped, or 0 on request), DCG defined as 0") {
        const std::vector<int> q(3, 9), rel{0, 0, 0};
        const std::vector<double> s{.3, .2, .1};
        CHECK_THROWS_AS(evaluate(ndcg{}, by_query(q, rel), s), heldout::undefined_error);
        CHECK(evaluate(ndcg{.no_relevant = heldout::if_no_relevant::zero}, by_query(q, rel), s) == 0.0);
        CHECK(evaluate(dcg{}, by_query(q, rel), s) == 0.0);
    }

    TEST_CASE("names show the cutoff and non-default parameters") {
        CHECK(ndcg{}.name() == "NDCG@10");
        CHECK(ndcg{.k = 0}.name() == "NDCG");
        CHECK(ndcg{.k = 5, .gain = heldout::gain::linear}.name() == "NDCG@5 (linear gain)");
        CHECK(ndcg{.k = 5, .no_relevant = heldout::if_no_relevant::zero}.name() == "NDCG@5 (no relevant item = 0)");
        CHECK(dcg{.k = 3}.name() == "DCG@3");
        CHECK(!heldout::same_measure(ndcg{.k = 5}, ndcg{.k = 10}));
        CHECK(heldout::same_measure(ndcg{.k = 5}, ndcg{.k = 5}));
    }

    TEST_CASE("tie-exact = the mean over every order of the tied items (enumerated), 1000 random small queries") {
        std::mt19937 g(20261204);
        std::size_t compared = 0;
        for (int t = 0; t < 1000; ++t) {
            const auto c = heldout_test::random_small_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(0, c.scores.size() + 1)(g);
            for (const bool exponential : {true, false}) {
                const auto gn = exponential ? heldout::gain::exponential : heldout::gain::linear;
                using B = heldout_test::strict_order;
                const double want_dcg = heldout_test::over_tie_orders(
                    c.scores, c.rel, [&](const std::vector<double>& o) { return B::dcg(o, k, exponential); });
                CHECK(heldout_test::one_query(dcg{.k = k, .gain = gn}, c) == doctest::Approx(want_dcg).epsilon(1e-13));
                if (B::relevant(c.rel) == 0) {
                    CHECK(heldout_test::one_query(ndcg{.k = k, .gain = gn}, c) == -1);
                    continue;
                }
                const double want = heldout_test::over_tie_orders(
                    c.scores, c.rel, [&](const std::vector<double>& o) { return B::ndcg(o, k, exponential); });
                CHECK(heldout_test::one_query(ndcg{.k = k, .gain = gn}, c) == doctest::Approx(want).epsilon(1e-13));
                ++compared;
            }
        }
        CHECK(compared > 1000);
    }
    TEST_CASE("tie-exact on longer queries (selection of the head), 600 random queries of 10-40 items") {
        std::mt19937 g(99);
        using B = heldout_test::strict_order;
        for (int t = 0; t < 600; ++t) {
            const auto c = heldout_test::random_long_query(g);
            const std::size_t k = std::uniform_int_distribution<std::size_t>(1, 12)(g);
            if (B::relevant(c.rel) == 0)
                continue;
            const double want = heldout_test::over_tie_orders(
                c.scores, c.rel, [&](const std::vector<double>& o) { return B::ndcg(o, k, true); });
            CHECK(heldout_test::one_query(ndcg{.k = k}, c) == doctest::Approx(want).epsilon(1e-13));
        }
    }
}
