// Tests for heldout/plan/five_by_two.hpp: the 5x2cv splits of Dietterich (1998).
#include <heldout/plan/five_by_two.hpp>

#include <heldout/plan/repeated_kfold.hpp>

#include <doctest/doctest.h>

#include <vector>

TEST_SUITE("plan/five_by_two") {
    TEST_CASE("five replications of 2-fold CV in run order: index 2i + j = replication i, fold j") {
        // Dietterich TG (1998) Neural Computation 10:1895-1923: in each replication the data are
        // halved, trained on one half and tested on the other, then the halves swap.
        auto r = heldout::five_by_two{.seed = 3}.splits(21);
        REQUIRE(r.size() == 10);
        CHECK(r.repeats() == 5);
        CHECK(r.folds() == 2);
        const auto all = r.to_vector();
        for (std::size_t i = 0; i < 5; ++i) {
            const auto& a = all[2 * i];
            const auto& b = all[2 * i + 1];
            CHECK(a.repeat == i);
            CHECK(a.fold == 0);
            CHECK(b.repeat == i);
            CHECK(b.fold == 1);
            CHECK(a.train == b.test); // the halves swap
            CHECK(a.test == b.train);
            CHECK(a.test.size() == 11); // halves of 21: fold 0 takes the odd row
            CHECK(b.test.size() == 10);
        }
        CHECK(all[0].test != all[2].test); // replications are independent draws
    }
    TEST_CASE("equals repeated_kfold{.folds = 2, .repeats = 5} with the same seed") {
        const auto a = heldout::five_by_two{.seed = 9}.splits(40).to_vector();
        const auto b = heldout::repeated_kfold{.folds = 2, .repeats = 5, .seed = 9}.splits(40).to_vector();
        REQUIRE(a.size() == b.size());
        for (std::size_t i = 0; i < a.size(); ++i) {
            CHECK(a[i].test == b[i].test);
            CHECK(a[i].train == b[i].train);
        }
    }
    TEST_CASE("stratified halves keep each class within one row of half") {
        std::vector<int> y;
        for (int i = 0; i < 31; ++i)
            y.push_back(i % 3 == 0 ? 1 : 0); // 11 ones, 20 zeros
        for (const heldout::split& s : heldout::five_by_two{.seed = 1}.splits(heldout::strata(y))) {
            std::size_t ones = 0;
            for (auto t : s.test)
                ones += y[t] == 1;
            CHECK((ones == 5 || ones == 6));
        }
    }
    TEST_CASE("bad input names the plan") {
        try {
            heldout::five_by_two{}.splits(1);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "heldout::five_by_two: argument 'folds': 2 folds exceed the 1 rows");
        }
    }
}
