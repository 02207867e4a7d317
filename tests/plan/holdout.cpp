// Tests for heldout/plan/holdout.hpp: one random split, plain, stratified or grouped.
#include <heldout/plan/holdout.hpp>

#include <doctest/doctest.h>

#include <algorithm>
#include <random>
#include <set>
#include <string>
#include <vector>

namespace {
std::string message_of(auto&& f) {
    try {
        f();
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}
} // namespace

TEST_SUITE("plan/holdout") {
    TEST_CASE("golden: the test rows for seed 42 are pinned") {
        auto r = heldout::holdout{.test_fraction = 0.3, .seed = 42}.splits(20);
        REQUIRE(r.size() == 1);
        const auto& s = r.split(0);
        CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == std::vector<std::size_t>{0, 5, 10, 11, 18, 19});
        CHECK(s.train.size() == 14);
    }
    TEST_CASE("the documented draw, re-implemented naively") {
        // Self-written reference of holdout.hpp's rule: row tested when below(R) < T.
        for (std::uint64_t seed : {1u, 2u, 3u}) {
            heldout::rng g(seed, 0);
            std::vector<std::size_t> expect;
            std::size_t T = 13;
            for (std::size_t i = 0; i < 50; ++i)
                if (g.below(50 - i) < T) {
                    expect.push_back(i);
                    --T;
                }
            auto r = heldout::holdout{.test_count = 13, .seed = seed}.splits(50);
            const auto& s = r.split(0);
            CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == expect);
        }
    }
    TEST_CASE("test size: count, or round(fraction * n); both sides ascending and disjoint") {
        CHECK(heldout::holdout{.test_fraction = 0.25}.splits(10).split(0).test.size() == 3); // round(2.5) = 3
        CHECK(heldout::holdout{.test_fraction = 0.2}.splits(10).split(0).test.size() == 2);
        CHECK(heldout::holdout{.test_fraction = 0.9, .test_count = 4}.splits(10).split(0).test.size() == 4);
        std::mt19937_64 gen(4);
        for (int trial = 0; trial < 30; ++trial) {
            const std::size_t n = 2 + gen() % 400;
            const std::size_t t = 1 + gen() % (n - 1);
            auto r = heldout::holdout{.test_count = t, .seed = gen()}.splits(n);
            const auto& s = r.split(0);
            CHECK(s.test.size() == t);
            CHECK(s.train.size() == n - t);
            std::vector<std::size_t> all(s.train.begin(), s.train.end());
            all.insert(all.end(), s.test.begin(), s.test.end());
            std::sort(all.begin(), all.end());
            for (std::size_t i = 0; i < n; ++i)
                CHECK(all[i] == i);
        }
    }
    TEST_CASE("stratified: largest-remainder quotas, each class within one row of its exact share") {
        std::vector<int> y;
        for (int i = 0; i < 10; ++i)
            y.push_back(0);
        for (int i = 0; i < 7; ++i)
            y.push_back(1);
        for (int i = 0; i < 3; ++i)
            y.push_back(2);
        std::mt19937_64 gen(1);
        std::shuffle(y.begin(), y.end(), gen);
        // t = 7 of 20: exact shares 3.5, 2.45, 1.05; floors 3, 2, 1 (sum 6); the largest remainder
        // (class 0, 0.5) gets the 7th place: quotas 4, 2, 1.
        auto r = heldout::holdout{.test_count = 7, .seed = 3}.splits(heldout::strata(y));
        const auto& s = r.split(0);
        std::size_t c[3] = {0, 0, 0};
        for (auto t : s.test)
            ++c[y[t]];
        CHECK(c[0] == 4);
        CHECK(c[1] == 2);
        CHECK(c[2] == 1);
    }
    TEST_CASE("grouped: whole groups on the test side, at least the requested rows") {
        std::vector<int> g;
        for (int grp = 0; grp < 30; ++grp)
            for (int j = 0; j <= grp % 4; ++j)
                g.push_back(grp);
        for (std::uint64_t seed = 0; seed < 10; ++seed) {
            auto r = heldout::holdout{.test_fraction = 0.3, .seed = seed}.splits(heldout::groups(g));
            const auto& s = r.split(0);
            std::set<int> tg;
            for (auto t : s.test)
                tg.insert(g[t]);
            for (auto t : s.train)
                CHECK(tg.count(g[t]) == 0);
            const auto want = static_cast<std::size_t>(0.3 * static_cast<double>(g.size()) + 0.5);
            CHECK(s.test.size() >= want);
            CHECK(s.test.size() < want + 4); // overshoot below the largest group
        }
    }
    TEST_CASE("bad input names the plan and the argument") {
        CHECK(message_of([] { heldout::holdout{.test_fraction = 1.5}.splits(10); }) ==
              "heldout::holdout: argument 'test_fraction': must lie in (0, 1), got 1.5");
        CHECK(message_of([] { heldout::holdout{.test_fraction = 0.01}.splits(10); }) ==
              "heldout::holdout: argument 'test_fraction': 0.01 of 10 rows rounds to no test rows");
        CHECK(message_of([] { heldout::holdout{.test_fraction = 0.97}.splits(10); }) ==
              "heldout::holdout: argument 'test_fraction': 0.97 of 10 rows leaves no training rows");
        CHECK(message_of([] { heldout::holdout{.test_count = 10}.splits(10); }) ==
              "heldout::holdout: argument 'test_count': 10 test rows leave no training rows out of 10");
        CHECK(message_of([] { heldout::holdout{}.splits(1); }) ==
              "heldout::holdout: argument 'n': a train/test split needs at least 2 rows");
        const std::vector<int> g{1, 1, 1, 1, 1, 1, 1, 1, 2, 3};
        CHECK(message_of([&] { heldout::holdout{.test_fraction = 0.3}.splits(heldout::groups(g)); }) ==
              "heldout::holdout: argument 'groups': group 0 (id 1) has 8 rows: with 3 test rows out of 10 a draw "
              "could leave no training rows");
        const std::vector<int> one(5, 4);
        CHECK(message_of([&] { heldout::holdout{}.splits(heldout::groups(one)); }) ==
              "heldout::holdout: argument 'groups': a grouped split needs at least 2 groups");
    }
}
