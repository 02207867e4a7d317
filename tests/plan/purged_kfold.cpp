// Tests for heldout/plan/purged_kfold.hpp: contiguous folds, purging and embargo.
#include <heldout/plan/purged_kfold.hpp>

#include <heldout/plan/check.hpp>

#include <doctest/doctest.h>

#include <random>
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
std::vector<std::size_t> v(std::span<const std::size_t> s) { return {s.begin(), s.end()}; }
} // namespace

TEST_SUITE("plan/purged_kfold") {
    TEST_CASE("methods.md Section 16 worked case: t0 = i, t1 = i + 2, test {4, 5}") {
        // López de Prado (2018), Advances in Financial Machine Learning, Ch. 7; check values
        // [SELF] from methods.md Section 16: purging leaves {0, 1, 8, 9}; with embargo 1 (span
        // extended to [4, 8]) also 8 goes, leaving {0, 1, 9}.
        std::vector<int> t0, t1;
        for (int i = 0; i < 10; ++i) {
            t0.push_back(i);
            t1.push_back(i + 2);
        }
        auto plain = heldout::purged_kfold{.folds = 5}.splits(heldout::intervals(t0, t1));
        REQUIRE(plain.size() == 5);
        CHECK(v(plain.split(2).test) == std::vector<std::size_t>{4, 5});
        CHECK(v(plain.split(2).train) == std::vector<std::size_t>{0, 1, 8, 9});
        auto emb = heldout::purged_kfold{.folds = 5, .embargo = 1}.splits(heldout::intervals(t0, t1));
        CHECK(v(emb.split(2).train) == std::vector<std::size_t>{0, 1, 9});
        CHECK(v(emb.split(0).test) == std::vector<std::size_t>{0, 1});
        CHECK(v(emb.split(0).train) == std::vector<std::size_t>{5, 6, 7, 8, 9}); // span [0, 3 + 1]
    }
    TEST_CASE("property: folds are contiguous blocks; no train interval meets the test span") {
        std::mt19937_64 gen(21);
        for (int trial = 0; trial < 30; ++trial) {
            const std::size_t n = 5 + gen() % 200;
            std::vector<double> t0(n), t1(n);
            double t = 0;
            for (std::size_t i = 0; i < n; ++i) {
                t += static_cast<double>(gen() % 3);
                t0[i] = t;
                t1[i] = t + static_cast<double>(gen() % 7);
            }
            const std::size_t k = 2 + gen() % 5;
            const double embargo = static_cast<double>(gen() % 4) * 0.5;
            const heldout::intervals iv(t0, t1);
            auto r = heldout::purged_kfold{.folds = k, .embargo = embargo}.splits(iv);
            std::vector<int> tested(n, 0);
            for (const heldout::split& s : r) {
                for (std::size_t j = 1; j < s.test.size(); ++j)
                    CHECK(s.test[j] == s.test[j - 1] + 1);
                for (auto x : s.test)
                    ++tested[x];
                CHECK_NOTHROW(heldout::check_purged(s, iv, embargo));
            }
            CHECK(std::all_of(tested.begin(), tested.end(), [](int c) { return c == 1; }));
        }
    }
    TEST_CASE("bad input") {
        const std::vector<double> a{0, 1, 2}, b{1, 2, 3};
        CHECK(message_of([&] { heldout::purged_kfold{.folds = 4}.splits(heldout::intervals(a, b)); }) ==
              "heldout::purged_kfold: argument 'folds': 4 folds exceed the 3 rows");
        CHECK(message_of([&] { heldout::purged_kfold{.folds = 1}.splits(heldout::intervals(a, b)); }) ==
              "heldout::purged_kfold: argument 'folds': must be at least 2, got 1");
        CHECK(message_of([&] { heldout::purged_kfold{.folds = 2, .embargo = -1}.splits(heldout::intervals(a, b)); }) ==
              "heldout::purged_kfold: argument 'embargo': must be finite and non-negative, got -1");
        const std::vector<long> ia{0, 1, 2}, ib{1, 2, 3};
        CHECK(message_of([&] {
                  heldout::purged_kfold{.folds = 2, .embargo = 0.5}.splits(heldout::intervals(ia, ib));
              }) == "heldout::purged_kfold: argument 'embargo': must be a whole number with integer times, got 0.5");
    }
}
