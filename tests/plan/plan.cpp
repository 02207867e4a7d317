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
    TEST_CASE("no silent empty side: every plan either refuses or gives each split a training and a test row") {
        // Small n and every setting in a range, including the degenerate ones. Bootstrap alone may
        // give an empty out-of-bag (test) set: kept, and skipped by the aggregator.
        std::size_t built = 0, refused = 0;
        auto run = [&](auto&& make, bool test_may_be_empty = false) {
            try {
                auto r = make();
                for (const heldout::split& s : r) {
                    CHECK(!s.train.empty());
                    if (!test_may_be_empty)
                        CHECK(!s.test.empty());
                }
                ++built;
            } catch (const heldout::input_error&) {
                ++refused;
            }
        };
        for (std::size_t n = 1; n <= 9; ++n) {
            std::vector<int> y(n), g(n);
            std::vector<double> t0(n), t1(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<int>(i % 3 == 0);
                g[i] = static_cast<int>(i / 2);
                t0[i] = static_cast<double>(i);
                t1[i] = static_cast<double>(i) + 2;
            }
            for (std::size_t k = 0; k <= n + 1; ++k) {
                run([&] { return heldout::kfold{.folds = k, .seed = 1}.splits(n); });
                run([&] { return heldout::kfold{.folds = k, .seed = 1}.splits(heldout::strata(y)); });
                run([&] { return heldout::kfold{.folds = k, .seed = 1}.splits(heldout::groups(g)); });
                run([&] {
                    return heldout::kfold{.folds = k, .seed = 1}.splits(heldout::strata(y), heldout::groups(g));
                });
                run([&] { return heldout::repeated_kfold{.folds = k, .repeats = 2, .seed = 1}.splits(n); });
                run([&] { return heldout::holdout{.test_count = k, .seed = 1}.splits(n); });
                run([&] { return heldout::holdout{.test_count = k, .seed = 1}.splits(heldout::strata(y)); });
                run([&] {
                    return heldout::subsampling{.repeats = 3, .test_count = k, .seed = 1}.splits(heldout::groups(g));
                });
                run([&] { return heldout::holdout{.test_fraction = static_cast<double>(k) / 10}.splits(n); });
                for (double embargo : {0.0, 1.0, 3.0, 8.0})
                    run([&] {
                        return heldout::purged_kfold{.folds = k, .embargo = embargo}.splits(heldout::intervals(t0, t1));
                    });
                for (std::size_t gap = 0; gap < 3; ++gap)
                    for (std::size_t window = 0; window < 3; ++window)
                        run([&] {
                            return heldout::walk_forward{
                                .initial = k, .horizon = 1 + gap, .step = 2, .gap = gap, .window = window}
                                .splits(n);
                        });
            }
            run([&] { return heldout::five_by_two{.seed = 2}.splits(heldout::strata(y)); });
            run([&] { return heldout::leave_one_out{}.splits(n); });
            run([&] { return heldout::leave_one_out{}.splits(heldout::groups(g)); });
            run([&] { return heldout::bootstrap{.replicates = 20, .seed = 1}.splits(n); }, true);
            run([&] { return heldout::bootstrap{.replicates = 20, .seed = 1}.splits(heldout::strata(y)); }, true);
            run([&] { return heldout::bootstrap{.replicates = 20, .seed = 1}.splits(heldout::groups(g)); }, true);
            // Nested: the inner plan inside every outer training set, refused by inner(i) where it
            // cannot be built there.
            for (std::size_t k = 2; k <= 4; ++k) {
                try {
                    auto r =
                        heldout::nested{heldout::kfold{.folds = 2, .seed = 1}, heldout::kfold{.folds = k, .seed = 2}}
                            .splits(n);
                    for (std::size_t i = 0; i < r.size(); ++i)
                        run([&] { return r.inner(i); });
                } catch (const heldout::input_error&) {
                    ++refused;
                }
            }
        }
        CHECK(built > 100); // both outcomes are exercised
        CHECK(refused > 100);
    }
}
