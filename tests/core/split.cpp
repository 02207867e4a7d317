// Tests for heldout/core/split.hpp: the split view and its owning copy.
#include <heldout/core/split.hpp>

#include <doctest/doctest.h>

#include <vector>

TEST_SUITE("core/split") {
    TEST_CASE("owned_split copies a split and views it back") {
        std::vector<std::size_t> train{0, 2, 2, 3}, test{1, 4};
        std::vector<std::uint32_t> counts{1, 0, 2, 1, 0};
        const heldout::split s{train, test, 1, 2, 7, counts};
        heldout::owned_split o(s);
        train[0] = 99; // the copy does not alias the source buffers
        const heldout::split v = o.view();
        CHECK(v.train.size() == 4);
        CHECK(v.train[0] == 0);
        CHECK(v.test[1] == 4);
        CHECK(v.repeat == 1);
        CHECK(v.fold == 2);
        CHECK(v.index == 7);
        CHECK(v.counts.size() == 5);
        CHECK(v.counts[2] == 2);
    }
    TEST_CASE("a default split is empty and carries no counts") {
        const heldout::split s{};
        CHECK(s.train.empty());
        CHECK(s.test.empty());
        CHECK(s.counts.empty());
    }
}
