// Tests for heldout/plan/leave_one_out.hpp: leave-one-out and leave-one-group-out.
#include <heldout/plan/leave_one_out.hpp>

#include <heldout/plan/check.hpp>

#include <doctest/doctest.h>

#include <string>
#include <vector>

TEST_SUITE("plan/leave_one_out") {
    TEST_CASE("split i tests row i and trains on the others") {
        auto r = heldout::leave_one_out{}.splits(6);
        REQUIRE(r.size() == 6);
        for (const heldout::split& s : r) {
            REQUIRE(s.test.size() == 1);
            CHECK(s.test[0] == s.index);
            CHECK(s.fold == s.index);
            CHECK(s.train.size() == 5);
            for (auto t : s.train)
                CHECK(t != s.index);
        }
        CHECK_NOTHROW(heldout::check_splits(r));
    }
    TEST_CASE("with groups: split g tests dense group g (ascending id)") {
        const std::vector<int> g{30, 10, 30, 20, 10, 10};
        auto r = heldout::leave_one_out{}.splits(heldout::groups(g));
        REQUIRE(r.size() == 3);
        const auto all = r.to_vector();
        CHECK(all[0].test == std::vector<std::size_t>{1, 4, 5}); // id 10
        CHECK(all[1].test == std::vector<std::size_t>{3});       // id 20
        CHECK(all[2].test == std::vector<std::size_t>{0, 2});    // id 30
        CHECK(all[2].train == std::vector<std::size_t>{1, 3, 4, 5});
        CHECK_NOTHROW(heldout::check_partition(r));
    }
    TEST_CASE("bad input") {
        try {
            heldout::leave_one_out{}.splits(1);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "heldout::leave_one_out: argument 'n': leave-one-out needs at least 2 rows");
        }
        try {
            heldout::leave_one_out{}.splits(heldout::groups(std::vector<int>{1, 1}));
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) ==
                  "heldout::leave_one_out: argument 'groups': leave-one-group-out needs at least 2 groups");
        }
    }
}
