// Tests for heldout/plan/purged_kfold.hpp: contiguous folds, purging and embargo.
#include <heldout/plan/purged_kfold.hpp>

#include <heldout/plan/check.hpp>

#include <doctest/doctest.h>

#include <algorithm>
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
    TEST_CASE("López de Prado 2018 ch. 7, worked by hand: t0 = i, t1 = i + 2, test {4, 5}") {
        // López de Prado (2018), Advances in Financial Machine Learning, Ch. 7; check values
        // worked by hand from the definition in the paper: purging leaves {0, 1, 8, 9}; with embargo 1 (span
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
            // Some of these plans purge every training row of a split: refused (see below).
            const std::string refused =
                message_of([&] { heldout::purged_kfold{.folds = k, .embargo = embargo}.splits(iv); });
            if (refused != "no error") {
                CHECK(refused.find("with no training row") != std::string::npos);
                continue;
            }
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
    TEST_CASE("a plan that leaves a split with no training row is refused when the range is built") {
        // t0 = i, t1 = i + 3, 10 rows, 5 folds of 2. Split 1 tests rows 2..3, span [2, 6]:
        // rows 0, 1 end at 3, 4 >= 2 (purged before it); after it, row r survives when
        // t0 = r > 6 + embargo. Embargo 2: row 9 survives; embargo 3 (span [2, 9]): none does.
        std::vector<int> t0, t1;
        for (int i = 0; i < 10; ++i) {
            t0.push_back(i);
            t1.push_back(i + 3);
        }
        const heldout::intervals iv(t0, t1);
        auto ok = heldout::purged_kfold{.folds = 5, .embargo = 2}.splits(iv);
        CHECK(v(ok.split(1).train) == std::vector<std::size_t>{9});
        CHECK(message_of([&] { heldout::purged_kfold{.folds = 5, .embargo = 3}.splits(iv); }) ==
              "heldout::purged_kfold: argument 'embargo': with folds = 5, embargo = 3 leaves split 1 with no "
              "training row: the label interval of every row outside its test rows 2..3 meets the test span "
              "[2, 9]; use a smaller embargo");
        // Labels that all span [0, 10]: every row overlaps every test span whatever the embargo.
        const std::vector<double> z(6, 0.0), ten(6, 10.0);
        CHECK(message_of([&] { heldout::purged_kfold{.folds = 2}.splits(heldout::intervals(z, ten)); }) ==
              "heldout::purged_kfold: argument 'intervals': with folds = 2, embargo = 0 leaves split 0 with no "
              "training row: the label interval of every row outside its test rows 0..2 meets the test span "
              "[0, 10]; use more folds or shorter label intervals");
    }
    TEST_CASE("property: refused exactly when a split, built by the documented rule, has no training row") {
        std::mt19937_64 gen(77);
        int refused = 0, accepted = 0;
        for (int trial = 0; trial < 400; ++trial) {
            const std::size_t n = 2 + gen() % 30;
            std::vector<long> t0(n), t1(n);
            long t = 0;
            for (std::size_t i = 0; i < n; ++i) {
                t += static_cast<long>(gen() % 3);
                t0[i] = t;
                t1[i] = t + static_cast<long>(gen() % 12);
            }
            const std::size_t k = 2 + gen() % std::min<std::size_t>(n - 1, 6);
            const double embargo = static_cast<double>(gen() % 8);
            // The rule of purged_kfold.hpp, row by row: fold f = block [b, e); a row outside it is
            // kept unless [t0, t1] meets [min t0, max t1 + embargo] of the block.
            bool some_split_empty = false;
            for (std::size_t f = 0; f < k; ++f) {
                const std::size_t b = f * (n / k) + std::min(f, n % k), e = (f + 1) * (n / k) + std::min(f + 1, n % k);
                long lo = t0[b], hi = t1[b];
                for (std::size_t r = b; r < e; ++r) {
                    lo = std::min(lo, t0[r]);
                    hi = std::max(hi, t1[r]);
                }
                hi += static_cast<long>(embargo);
                std::size_t kept = 0;
                for (std::size_t r = 0; r < n; ++r)
                    kept += (r < b || r >= e) && !(t0[r] <= hi && t1[r] >= lo);
                some_split_empty = some_split_empty || kept == 0;
            }
            const heldout::intervals iv(t0, t1);
            const std::string m = message_of([&] { heldout::purged_kfold{.folds = k, .embargo = embargo}.splits(iv); });
            CHECK_MESSAGE((m != "no error") == some_split_empty, m);
            if (m == "no error") {
                ++accepted;
                for (const heldout::split& s : heldout::purged_kfold{.folds = k, .embargo = embargo}.splits(iv)) {
                    CHECK(!s.train.empty());
                    CHECK(!s.test.empty());
                }
            } else {
                ++refused;
                CHECK(m.find("with no training row") != std::string::npos);
            }
        }
        CHECK(refused > 20); // both outcomes occur in this sweep
        CHECK(accepted > 20);
    }
}
