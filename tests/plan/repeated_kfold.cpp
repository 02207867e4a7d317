// Tests for heldout/plan/repeated_kfold.hpp: repeats of the k-fold assignment.
#include <heldout/plan/repeated_kfold.hpp>

#include <heldout/plan/check.hpp>
#include <heldout/plan/kfold.hpp>

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
} // namespace

TEST_SUITE("plan/repeated_kfold") {
    TEST_CASE("golden: repeat 1 of seed 42 is pinned") {
        CHECK(heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 42}.splits(20).engine().assignment(1) ==
              std::vector<std::uint32_t>{0, 0, 2, 0, 0, 1, 2, 1, 0, 1, 1, 2, 0, 1, 1, 1, 2, 2, 2, 0});
    }
    TEST_CASE("repeat 0 is kfold with the same seed; a repeat does not depend on the repeat count") {
        auto a = heldout::repeated_kfold{.folds = 4, .repeats = 3, .seed = 5}.splits(50).to_vector();
        auto b = heldout::kfold{.folds = 4, .seed = 5}.splits(50).to_vector();
        auto c = heldout::repeated_kfold{.folds = 4, .repeats = 7, .seed = 5}.splits(50).to_vector();
        REQUIRE(a.size() == 12);
        for (std::size_t f = 0; f < 4; ++f) {
            CHECK(a[f].test == b[f].test);
            CHECK(a[f].train == b[f].train);
        }
        for (std::size_t i = 0; i < 12; ++i)
            CHECK(a[i].test == c[i].test);
        CHECK(a[4].test != a[0].test); // repeats differ (a fact of this seed)
    }
    TEST_CASE("index = repeat * folds + fold; every row tested once per repeat, random sizes") {
        std::mt19937_64 gen(19);
        for (int trial = 0; trial < 20; ++trial) {
            const std::size_t n = 3 + gen() % 200, k = 2 + gen() % (std::min<std::size_t>(n, 20) - 1);
            const std::size_t R = 1 + gen() % 4;
            auto r = heldout::repeated_kfold{.folds = k, .repeats = R, .seed = gen()}.splits(n);
            CHECK(r.size() == k * R);
            CHECK(r.repeats() == R);
            CHECK(r.folds() == k);
            for (const heldout::split& s : r) {
                CHECK(s.index == s.repeat * k + s.fold);
                CHECK(s.test.size() >= n / k);
                CHECK(s.test.size() <= (n + k - 1) / k);
            }
            CHECK_NOTHROW(heldout::check_partition(r));
        }
    }
    TEST_CASE("random access in any order equals iteration") {
        auto r = heldout::repeated_kfold{.folds = 3, .repeats = 3, .seed = 1}.splits(31);
        const auto all = r.to_vector();
        for (std::size_t i : {8, 0, 4, 4, 7, 1}) {
            const auto& s = r.split(i);
            CHECK(std::vector<std::size_t>(s.test.begin(), s.test.end()) == all[i].test);
            CHECK(std::vector<std::size_t>(s.train.begin(), s.train.end()) == all[i].train);
        }
    }
    TEST_CASE("bad input") {
        CHECK(message_of([] { heldout::repeated_kfold{.folds = 2, .repeats = 0}.splits(10); }) ==
              "heldout::repeated_kfold: argument 'repeats': must be at least 1");
        CHECK(message_of([] { heldout::repeated_kfold{.folds = 0}.splits(10); }) ==
              "heldout::repeated_kfold: argument 'folds': must be at least 2, got 0");
    }
}
