// Tests for heldout/plan/check.hpp: each guard accepts good splits and names the bad one.
#include <heldout/plan/check.hpp>

#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>

#include <doctest/doctest.h>

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
heldout::owned_split make(std::vector<std::size_t> train, std::vector<std::size_t> test) {
    heldout::owned_split s;
    s.train = std::move(train);
    s.test = std::move(test);
    return s;
}
} // namespace

TEST_SUITE("plan/check") {
    TEST_CASE("check_disjoint") {
        CHECK_NOTHROW(heldout::check_disjoint(make({0, 2}, {1, 3}).view(), 4));
        CHECK(message_of([] {
                  heldout::check_disjoint(make({0, 1, 2}, {1, 3}).view(), 4);
              }) == "heldout::check_disjoint: argument 'split': split 0 (repeat 0, fold 0): row 1 is in both train and "
                    "test at index 1");
        CHECK(message_of([] {
                  heldout::check_disjoint(make({0, 2}, {3, 1}).view(), 4);
              }) == "heldout::check_disjoint: argument 'split': split 0 (repeat 0, fold 0): test rows not strictly "
                    "ascending at index 1");
        CHECK(message_of([] {
                  heldout::check_disjoint(make({0, 9}, {1}).view(), 4);
              }) ==
              "heldout::check_disjoint: argument 'split': split 0 (repeat 0, fold 0): train row 9 outside 0..3 at "
              "index 1");
        CHECK(message_of([] {
                  heldout::check_disjoint(make({0, 0}, {1}).view(), 4);
              }) ==
              "heldout::check_disjoint: argument 'split': split 0 (repeat 0, fold 0): train row 0 repeated at index 1");
        // Bootstrap splits may repeat train rows; counts must agree.
        auto b = heldout::bootstrap{.replicates = 1, .seed = 1}.splits(8);
        CHECK_NOTHROW(heldout::check_disjoint(b.split(0), 8));
        heldout::owned_split bad(b.split(0));
        bad.counts[bad.train[0]] += 1;
        CHECK(message_of([&] { heldout::check_disjoint(bad.view(), 8); }).find("counts disagree") != std::string::npos);
    }
    TEST_CASE("check_groups") {
        const heldout::groups g(std::vector<int>{1, 1, 2, 2});
        CHECK_NOTHROW(heldout::check_groups(make({0, 1}, {2, 3}).view(), g));
        CHECK(message_of([&] {
                  heldout::check_groups(make({0, 2}, {1, 3}).view(), g);
              }) ==
              "heldout::check_groups: argument 'split': split 0 (repeat 0, fold 0): group 0 (id 1) is on both sides "
              "(train row 0) at index 0");
    }
    TEST_CASE("check_time_order") {
        CHECK_NOTHROW(heldout::check_time_order(make({0, 1, 2}, {4, 5}).view(), 1));
        CHECK(message_of([] {
                  heldout::check_time_order(make({0, 1, 2}, {3, 4}).view(), 1);
              }) ==
              "heldout::check_time_order: argument 'split': split 0 (repeat 0, fold 0): time order broken: train row "
              "2 and test row 3 are not separated by 1 rows");
        CHECK(message_of([] {
                  heldout::check_time_order(make({0, 5}, {3}).view());
              }).find("time order broken") != std::string::npos);
    }
    TEST_CASE("check_purged") {
        std::vector<int> t0{0, 1, 2, 3, 4, 5}, t1{1, 2, 3, 4, 5, 6};
        const heldout::intervals iv(t0, t1);
        CHECK_NOTHROW(heldout::check_purged(make({0, 5}, {2, 3}).view(), iv));
        CHECK(message_of([&] {
                  heldout::check_purged(make({0, 5}, {2, 3}).view(), iv, 1);
              }) ==
              "heldout::check_purged: argument 'split': split 0 (repeat 0, fold 0): train row 5 overlaps the test "
              "label span at index 1");
        CHECK(message_of([&] { heldout::check_purged(make({1}, {2}).view(), iv); }).find("overlaps") !=
              std::string::npos);
    }
    TEST_CASE("check_partition and check_splits over ranges and kept splits") {
        auto r = heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 1}.splits(17);
        CHECK_NOTHROW(heldout::check_partition(r));
        CHECK_NOTHROW(heldout::check_splits(r));
        auto kept = r.to_vector();
        CHECK_NOTHROW(heldout::check_partition(kept, 17, 3));
        kept[4].test.push_back(kept[3].test[0]); // a row tested twice in repeat 1
        CHECK(message_of([&] { heldout::check_partition(kept, 17, 3); }).find("tested 2 times, not once") !=
              std::string::npos);
        CHECK(message_of([&] { heldout::check_partition(kept, 17, 4); }) ==
              "heldout::check_partition: argument 'folds': 6 splits are not whole repeats of 4 folds");
    }
}
