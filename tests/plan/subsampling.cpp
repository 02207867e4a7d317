// Tests for heldout/plan/subsampling.hpp: repeated random holdout (Monte-Carlo CV).
#include <heldout/plan/subsampling.hpp>

#include <heldout/plan/holdout.hpp>

#include <doctest/doctest.h>

#include <string>
#include <vector>

TEST_SUITE("plan/subsampling") {
    TEST_CASE("split 0 is the holdout with the same members; splits are independent draws") {
        auto r = heldout::subsampling{.repeats = 20, .test_fraction = 0.2, .seed = 6}.splits(100);
        REQUIRE(r.size() == 20);
        CHECK(r.repeats() == 20);
        const auto all = r.to_vector();
        const auto h = heldout::holdout{.test_fraction = 0.2, .seed = 6}.splits(100).to_vector();
        CHECK(all[0].test == h[0].test);
        CHECK(all[0].train == h[0].train);
        std::vector<int> tested(100, 0);
        for (const auto& s : all) {
            CHECK(s.test.size() == 20);
            CHECK(s.fold == 0);
            CHECK(s.repeat == s.index);
            for (auto t : s.test)
                ++tested[t];
        }
        CHECK(all[1].test != all[0].test);
        // Rows may be tested several times or never: 400 test places over 100 rows.
        int total = 0;
        for (int c : tested)
            total += c;
        CHECK(total == 400);
    }
    TEST_CASE("stratified and grouped forms") {
        std::vector<int> y(60);
        for (std::size_t i = 0; i < y.size(); ++i)
            y[i] = static_cast<int>(i % 4 == 0);
        for (const heldout::split& s :
             heldout::subsampling{.repeats = 5, .test_count = 12, .seed = 1}.splits(heldout::strata(y))) {
            std::size_t ones = 0;
            for (auto t : s.test)
                ones += static_cast<std::size_t>(y[t]);
            CHECK(ones == 3); // 12 * 15 / 60 exactly
        }
        auto g = heldout::subsampling{.repeats = 3, .seed = 2}.splits(heldout::groups(y));
        CHECK(g.size() == 3);
    }
    TEST_CASE("bad input names the plan") {
        try {
            heldout::subsampling{.repeats = 0}.splits(10);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "heldout::subsampling: argument 'repeats': must be at least 1");
        }
    }
}
