// Tests for heldout/plan/bootstrap.hpp: draws with replacement, out-of-bag test sets.
#include <heldout/plan/bootstrap.hpp>

#include <heldout/plan/check.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <set>
#include <string>
#include <vector>

TEST_SUITE("plan/bootstrap") {
    TEST_CASE("golden: the draw counts for seed 42 are pinned") {
        auto r = heldout::bootstrap{.replicates = 1, .seed = 42}.splits(10);
        const auto& s = r.split(0);
        CHECK(std::vector<std::uint32_t>(s.counts.begin(), s.counts.end()) ==
              std::vector<std::uint32_t>{1, 1, 1, 1, 2, 2, 1, 1, 0, 0});
        CHECK(std::vector<std::size_t>(s.train.begin(), s.train.end()) ==
              std::vector<std::size_t>{0, 1, 2, 3, 4, 4, 5, 5, 6, 7});
        CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == std::vector<std::size_t>{8, 9});
    }
    TEST_CASE("the documented draw, re-implemented: n draws below(n) from rng(seed, b)") {
        for (std::size_t b = 0; b < 3; ++b) {
            heldout::rng g(17, b);
            std::vector<std::uint32_t> c(25, 0);
            for (int j = 0; j < 25; ++j)
                ++c[g.below(25)];
            auto r = heldout::bootstrap{.replicates = 3, .seed = 17}.splits(25);
            const auto& s = r.split(b);
            CHECK(std::vector<std::uint32_t>(s.counts.begin(), s.counts.end()) == c);
            CHECK(s.repeat == b);
        }
    }
    TEST_CASE("train has n rows with multiplicity, counts agree, test = never drawn") {
        auto r = heldout::bootstrap{.replicates = 30, .seed = 2}.splits(57);
        for (const heldout::split& s : r) {
            CHECK(s.train.size() == 57);
            CHECK(s.counts.size() == 57);
            for (auto t : s.test)
                CHECK(s.counts[t] == 0);
            std::size_t oob = 0;
            for (auto c : s.counts)
                oob += c == 0;
            CHECK(oob == s.test.size());
        }
        CHECK_NOTHROW(heldout::check_splits(r));
    }
    TEST_CASE("the out-of-bag share tends to (1 - 1/n)^n") {
        // A fact of probability: each row is missed by all n draws with probability (1 - 1/n)^n;
        // values from Efron & Tibshirani 1997, worked by hand: n = 10 -> 0.3486784401,
        // n = 100 -> 0.3660323413, limit e^-1 = 0.3678794412. Band: 10 standard errors of the
        // mean over B replicates (fixed seed; it cannot flake).
        for (std::size_t n : {10u, 100u, 1000u}) {
            const std::size_t B = 2000;
            auto r = heldout::bootstrap{.replicates = B, .seed = 99}.splits(n);
            double sum = 0;
            for (const heldout::split& s : r)
                sum += static_cast<double>(s.test.size()) / static_cast<double>(n);
            const double expect = std::pow(1.0 - 1.0 / static_cast<double>(n), static_cast<double>(n));
            // The out-of-bag indicators are negatively correlated Bernoullis, so the share's SD is
            // at most 0.5 / sqrt(n) and the mean's SE at most 0.5 / sqrt(n B).
            const double se = 0.5 / std::sqrt(static_cast<double>(B * n));
            CAPTURE(n);
            CHECK(std::abs(sum / static_cast<double>(B) - expect) < 10 * se);
        }
        CHECK(std::pow(1.0 - 1.0 / 10, 10) == doctest::Approx(0.3486784401).epsilon(1e-10));
        CHECK(std::pow(1.0 - 1.0 / 100, 100) == doctest::Approx(0.3660323413).epsilon(1e-10));
    }
    TEST_CASE("stratified: every class keeps its size in the sample") {
        std::vector<int> y{0, 0, 0, 1, 1, 2, 2, 2, 2, 1, 0};
        for (const heldout::split& s : heldout::bootstrap{.replicates = 20, .seed = 4}.splits(heldout::strata(y))) {
            std::size_t c[3] = {0, 0, 0};
            for (auto t : s.train)
                ++c[y[t]];
            CHECK(c[0] == 4);
            CHECK(c[1] == 3);
            CHECK(c[2] == 4);
        }
    }
    TEST_CASE("grouped (cluster bootstrap): whole groups drawn, out-of-bag groups untouched") {
        std::vector<int> g;
        for (int grp = 0; grp < 12; ++grp)
            for (int j = 0; j <= grp % 3; ++j)
                g.push_back(grp);
        auto r = heldout::bootstrap{.replicates = 20, .seed = 8}.splits(heldout::groups(g));
        for (const heldout::split& s : r) {
            std::set<int> test_groups;
            for (auto t : s.test)
                test_groups.insert(g[t]);
            for (auto t : s.train)
                CHECK(test_groups.count(g[t]) == 0);
            // rows of one group share a count
            for (std::size_t i = 1; i < g.size(); ++i)
                if (g[i] == g[i - 1])
                    CHECK(s.counts[i] == s.counts[i - 1]);
        }
    }
    TEST_CASE("bad input") {
        try {
            heldout::bootstrap{.replicates = 0}.splits(10);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "heldout::bootstrap: argument 'replicates': must be at least 1");
        }
        try {
            heldout::bootstrap{}.splits(1);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "heldout::bootstrap: argument 'n': the bootstrap needs at least 2 rows");
        }
    }
    TEST_CASE("refusals; a replicate that draws every row is kept with an empty out-of-bag set") {
        try {
            heldout::bootstrap{}.splits(heldout::groups(std::vector<int>{3, 3, 3}));
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) ==
                  "heldout::bootstrap: argument 'groups': the grouped bootstrap needs at least 2 groups");
        }
        // Two rows: each replicate draws both with probability 1/2. Not an error: the
        // out-of-bag set is empty and callers (the aggregator) skip it; train is never empty.
        std::size_t empty_oob = 0;
        for (const heldout::split& s : heldout::bootstrap{.replicates = 40, .seed = 3}.splits(2)) {
            CHECK(s.train.size() == 2);
            empty_oob += s.test.empty();
        }
        CHECK(empty_oob > 0);
        CHECK(empty_oob < 40);
    }
}
