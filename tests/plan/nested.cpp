// Tests for heldout/plan/nested.hpp: inner plans inside outer training sets.
#include <heldout/plan/nested.hpp>

#include <heldout/plan/check.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/walk_forward.hpp>

#include <doctest/doctest.h>

#include <algorithm>
#include <set>
#include <vector>

TEST_SUITE("plan/nested") {
    TEST_CASE("inner splits use original row numbers inside the outer training set") {
        auto r =
            heldout::nested{heldout::kfold{.folds = 4, .seed = 1}, heldout::kfold{.folds = 3, .seed = 2}}.splits(40);
        REQUIRE(r.size() == 4);
        for (const heldout::split& o : r) {
            const std::set<std::size_t> outer_train(o.train.begin(), o.train.end());
            const std::set<std::size_t> outer_test(o.test.begin(), o.test.end());
            const std::vector<std::size_t> ot(o.train.begin(), o.train.end());
            auto inner = r.inner(o.index);
            REQUIRE(inner.size() == 3);
            CHECK(inner.rows() == 40);
            std::vector<int> tested(40, 0);
            for (const heldout::split& s : inner) {
                for (auto t : s.test) {
                    CHECK(outer_train.count(t) == 1);
                    CHECK(outer_test.count(t) == 0);
                    ++tested[t];
                }
                for (auto t : s.train)
                    CHECK(outer_train.count(t) == 1);
            }
            for (std::size_t row = 0; row < 40; ++row)
                CHECK(tested[row] == (outer_train.count(row) ? 1 : 0));
            // The inner plan is the plain plan on positions 0..m-1, mapped through the outer train rows.
            auto direct = heldout::kfold{.folds = 3, .seed = 2}.splits(ot.size()).to_vector();
            const auto mapped = inner.to_vector();
            for (std::size_t f = 0; f < 3; ++f) {
                std::vector<std::size_t> expect;
                for (auto p : direct[f].test)
                    expect.push_back(ot[p]);
                CHECK(mapped[f].test == expect);
            }
        }
    }
    TEST_CASE("designated initialisers with explicit template arguments; strata passed down") {
        std::vector<int> y(60);
        for (std::size_t i = 0; i < y.size(); ++i)
            y[i] = static_cast<int>(i % 3 == 0);
        auto r = heldout::nested<heldout::kfold, heldout::kfold>{.outer = {.folds = 3, .seed = 1},
                                                                 .inner = {.folds = 2, .seed = 5}}
                     .splits(heldout::strata(y));
        for (const heldout::split& o : r) {
            std::size_t outer_ones = 0;
            for (auto t : o.train)
                outer_ones += static_cast<std::size_t>(y[t]);
            for (const heldout::split& s : r.inner(o.index)) {
                std::size_t ones = 0;
                for (auto t : s.test)
                    ones += static_cast<std::size_t>(y[t]);
                CHECK(ones >= outer_ones / 2); // stratified inside: within one row of half
                CHECK(ones <= (outer_ones + 1) / 2);
            }
        }
    }
    TEST_CASE("an inner plan that does not take the structure gets the row count") {
        std::vector<int> g(30);
        for (std::size_t i = 0; i < g.size(); ++i)
            g[i] = static_cast<int>(i / 3);
        auto r = heldout::nested{heldout::kfold{.folds = 5, .seed = 3},
                                 heldout::walk_forward{.initial = 10, .horizon = 4, .step = 4}}
                     .splits(heldout::groups(g));
        auto inner = r.inner(0);
        CHECK(inner.size() == (24 - 10 - 4) / 4 + 1);
        for (const heldout::split& s : inner)
            CHECK(s.train.back() < s.test.front());
    }
    TEST_CASE("an inner bootstrap reports counts by original row") {
        auto r = heldout::nested{heldout::kfold{.folds = 2, .seed = 3}, heldout::bootstrap{.replicates = 4, .seed = 1}}
                     .splits(20);
        const heldout::split& o = r.split(1);
        const std::set<std::size_t> outer_train(o.train.begin(), o.train.end());
        for (const heldout::split& s : r.inner(1)) {
            REQUIRE(s.counts.size() == 20);
            std::size_t total = 0;
            for (std::size_t row = 0; row < 20; ++row) {
                if (!outer_train.count(row))
                    CHECK(s.counts[row] == 0);
                total += s.counts[row];
            }
            CHECK(total == 10);
        }
    }
    TEST_CASE("an inner plan that cannot be built inside an outer training set is refused, naming the split") {
        // Outer walk-forward on 11 rows: origins 3, 6, 9, training [0, 3), [0, 6), [0, 9). A
        // 4-fold inner plan cannot split the first training set (3 rows); it can the others.
        auto r = heldout::nested{heldout::walk_forward{.initial = 3, .horizon = 2, .step = 3},
                                 heldout::kfold{.folds = 4, .seed = 1}}
                     .splits(11);
        REQUIRE(r.size() == 3);
        std::string message = "no error";
        try {
            r.inner(0);
        } catch (const heldout::input_error& e) {
            message = e.what();
        }
        CHECK(message == "heldout::nested: argument 'inner': cannot be built inside outer split 0 (repeat 0, fold 0), "
                         "which trains on 3 rows: heldout::kfold: argument 'folds': 4 folds exceed the 3 rows");
        CHECK(r.inner(1).size() == 4);
        for (const heldout::split& s : r.inner(2)) {
            CHECK(!s.train.empty());
            CHECK(!s.test.empty());
        }
        // Strata passed down: the stratified outer 2-fold splits the 4 rows of class 1 two and
        // two, so each outer training set holds 2 of them, fewer than the 3 inner folds.
        const std::vector<int> y{0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1};
        auto st = heldout::nested{heldout::kfold{.folds = 2, .seed = 4}, heldout::kfold{.folds = 3, .seed = 5}}.splits(
            heldout::strata(y));
        for (std::size_t i = 0; i < st.size(); ++i) {
            std::string m = "no error";
            try {
                st.inner(i);
            } catch (const heldout::input_error& e) {
                m = e.what();
            }
            CHECK(m.rfind("heldout::nested: argument 'inner': cannot be built inside outer split " + std::to_string(i),
                          0) == 0);
            CHECK(m.find("heldout::kfold: argument 'strata': stratum 1 (label 1) has 2 rows, fewer than the 3 folds") !=
                  std::string::npos);
        }
    }
}
