// Tests for heldout/plan/range.hpp: iteration, random access, cursors, copies, concepts.
#include <heldout/plan/range.hpp>

#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/purged_kfold.hpp>
#include <heldout/plan/walk_forward.hpp>

#include <doctest/doctest.h>

#include <iterator>
#include <ranges>
#include <thread>
#include <vector>

static_assert(heldout::split_plan<heldout::kfold>);
static_assert(heldout::split_plan<heldout::kfold, heldout::strata>);
static_assert(heldout::split_plan<heldout::bootstrap, heldout::groups>);
static_assert(heldout::split_plan<heldout::walk_forward>);
static_assert(!heldout::split_plan<heldout::walk_forward, heldout::strata>);
static_assert(heldout::split_plan<heldout::purged_kfold, heldout::intervals<double>>);
static_assert(std::input_iterator<heldout::kfold::range::iterator>);
static_assert(std::ranges::input_range<heldout::kfold::range>); // usable where a std range is expected

TEST_SUITE("plan/range") {
    TEST_CASE("iteration, random access, cursors and to_vector agree") {
        auto r = heldout::kfold{.folds = 5, .seed = 3}.splits(103);
        const auto kept = r.to_vector();
        REQUIRE(kept.size() == 5);
        std::size_t i = 0;
        for (const heldout::split& s : r) {
            CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == kept[i].test);
            CHECK(s.index == i);
            ++i;
        }
        auto c = r.cursor();
        CHECK(c.size() == 5);
        CHECK(std::vector<std::size_t>(c.split(3).train.begin(), c.split(3).train.end()) == kept[3].train);
    }
    TEST_CASE("one cursor per thread gives the same splits (std::thread)") {
        auto r = heldout::bootstrap{.replicates = 16, .seed = 5}.splits(500);
        const auto kept = r.to_vector();
        std::vector<int> same(16, 0);
        std::vector<std::thread> pool;
        for (int t = 0; t < 2; ++t)
            pool.emplace_back([&, t, c = r.cursor()]() mutable {
                for (std::size_t j = static_cast<std::size_t>(t); j < c.size(); j += 2) {
                    const auto& s = c.split(j);
                    same[j] = std::vector<std::size_t>(s.train.begin(), s.train.end()) == kept[j].train;
                }
            });
        for (auto& th : pool)
            th.join();
        for (int x : same)
            CHECK(x == 1);
    }
    TEST_CASE("a copied range starts fresh and shares nothing mutable") {
        auto r = heldout::kfold{.folds = 3, .seed = 1}.splits(30);
        const auto& s0 = r.split(0);
        const std::vector<std::size_t> t0(s0.test.begin(), s0.test.end());
        auto copy = r;
        const auto& c1 = copy.split(1);
        CHECK(c1.test.data() != r.split(1).test.data());
        CHECK(std::vector<std::size_t>(r.split(0).test.begin(), r.split(0).test.end()) == t0);
        auto moved = std::move(copy);
        CHECK(moved.split(2).fold == 2);
    }
    TEST_CASE("owned_split keeps a split beyond the next step") {
        auto r = heldout::kfold{.folds = 2, .seed = 1}.splits(10);
        const heldout::owned_split keep(r.split(0));
        r.split(1);
        CHECK(keep.test.size() == 5);
        CHECK(keep.view().fold == 0);
    }
}
