// Tests for heldout/plan.hpp: every plan is available from the umbrella alone.
#include <heldout/plan.hpp>

#include <doctest/doctest.h>

#include <vector>

TEST_SUITE("plan/plan") {
    TEST_CASE("all plans from <heldout/plan.hpp>") {
        const std::size_t n = 24;
        std::vector<int> y(n), g(n);
        std::vector<double> t0(n), t1(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = static_cast<int>(i % 2);
            g[i] = static_cast<int>(i / 2);
            t0[i] = static_cast<double>(i);
            t1[i] = static_cast<double>(i) + 1;
        }
        CHECK(heldout::holdout{.test_fraction = 0.25, .seed = 1}.splits(n).size() == 1);
        CHECK(heldout::subsampling{.repeats = 3, .test_count = 4, .seed = 1}.splits(n).size() == 3);
        CHECK(heldout::kfold{.folds = 4, .seed = 1}.splits(heldout::strata(y)).size() == 4);
        CHECK(heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 1}.splits(heldout::groups(g)).size() == 6);
        CHECK(heldout::five_by_two{.seed = 1}.splits(n).size() == 10);
        CHECK(heldout::leave_one_out{}.splits(n).size() == n);
        CHECK(heldout::bootstrap{.replicates = 7, .seed = 1}.splits(n).size() == 7);
        CHECK(heldout::walk_forward{.initial = 10, .horizon = 2, .step = 2}.splits(n).size() == 7);
        CHECK(heldout::purged_kfold{.folds = 3, .embargo = 1}.splits(heldout::intervals(t0, t1)).size() == 3);
        CHECK(heldout::nested{heldout::kfold{.folds = 3}, heldout::kfold{.folds = 2}}.splits(n).size() == 3);
        auto r = heldout::kfold{.folds = 3, .seed = 2}.splits(n);
        CHECK_NOTHROW(heldout::check_splits(r));
    }
}
