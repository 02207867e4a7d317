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
    TEST_CASE("a test size of 0 or n is refused, naming the member") {
        auto message = [](auto&& f) -> std::string {
            try {
                f();
            } catch (const heldout::input_error& e) {
                return e.what();
            }
            return "no error";
        };
        CHECK(message([] { heldout::subsampling{.repeats = 3, .test_fraction = 0}.splits(10); }) ==
              "heldout::subsampling: argument 'test_fraction': must lie in (0, 1), got 0");
        CHECK(message([] { heldout::subsampling{.repeats = 3, .test_fraction = 0.04}.splits(10); }) ==
              "heldout::subsampling: argument 'test_fraction': 0.04 of 10 rows rounds to no test rows");
        CHECK(message([] { heldout::subsampling{.repeats = 3, .test_count = 12}.splits(10); }) ==
              "heldout::subsampling: argument 'test_count': 12 test rows leave no training rows out of 10");
        const std::vector<int> g{1, 1, 1, 1, 1, 1, 1, 1, 2, 3};
        CHECK(message([&] { heldout::subsampling{.repeats = 3, .test_count = 3}.splits(heldout::groups(g)); }) ==
              "heldout::subsampling: argument 'groups': group 0 (id 1) has 8 rows: with 3 test rows out of 10 a draw "
              "could leave no training rows");
    }
}
