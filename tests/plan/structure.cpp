// Tests for heldout/plan/structure.hpp: strata, quantile bins, groups, label intervals.
#include <heldout/plan/structure.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <limits>
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
std::vector<std::uint32_t> ids(std::span<const std::uint32_t> s) { return {s.begin(), s.end()}; }
} // namespace

TEST_SUITE("plan/structure") {
    TEST_CASE("strata from labels: dense ids by ascending label, any integers") {
        const std::vector<int> y{7, -2, 7, 3, -2, 7};
        const heldout::strata s(y);
        CHECK(s.rows() == 6);
        CHECK(s.count() == 3);
        CHECK(ids(s.ids()) == std::vector<std::uint32_t>{2, 0, 2, 1, 0, 2});
        CHECK(std::vector<std::size_t>(s.sizes().begin(), s.sizes().end()) == std::vector<std::size_t>{2, 1, 3});
        CHECK(s.describe(2) == "stratum 2 (label 7)");
        // A wide value range takes the sorting path; the result is the same numbering.
        const std::vector<long long> wide{1LL << 40, -5, 1LL << 40, 0};
        CHECK(ids(heldout::strata(wide).ids()) == std::vector<std::uint32_t>{2, 0, 2, 1});
        const std::vector<bool> b{true, false, true};
        CHECK(ids(heldout::strata(std::vector<std::uint8_t>{1, 0, 1}).ids()) == std::vector<std::uint32_t>{1, 0, 1});
        (void)b;
    }
    TEST_CASE("strata from a continuous target: quantile bins, ties kept together") {
        // n = 8, 4 bins: bin = floor(rank * 4 / 8) = rank / 2, rank of the first of a tie group.
        const std::vector<double> v{0.5, 0.1, 0.9, 0.3, 0.3, 0.7, 0.2, 1.5};
        // sorted: 0.1(r0) 0.2(r1) 0.3(r2) 0.3(r2) 0.5(r4) 0.7(r5) 0.9(r6) 1.5(r7)
        // bins:    0       0       1       1       2       2       3       3
        const heldout::strata s(v, 4);
        CHECK(ids(s.ids()) == std::vector<std::uint32_t>{2, 0, 3, 1, 1, 2, 0, 3});
        CHECK(s.binned());
        // Heavy ties leave empty bins, which are dropped.
        const std::vector<double> t{1, 1, 1, 1, 1, 1, 2, 3};
        const heldout::strata u(t, 4); // ranks 0 -> bin 0; 6 -> bin 3; 7 -> bin 3
        CHECK(u.count() == 2);
        CHECK(ids(u.ids()) == std::vector<std::uint32_t>{0, 0, 0, 0, 0, 0, 1, 1});
    }
    TEST_CASE("subset renumbers densely") {
        const std::vector<int> y{5, 6, 7, 5, 7};
        const heldout::strata s(y);
        const std::vector<std::size_t> rows{2, 4, 3};
        const auto sub = s.subset(rows);
        CHECK(sub.count() == 2);
        CHECK(ids(sub.ids()) == std::vector<std::uint32_t>{1, 1, 0});
        CHECK(sub.describe(1) == "stratum 1 (label 7)");
    }
    TEST_CASE("groups: dense ids by ascending id") {
        const std::vector<long> g{100, 3, 100, 42};
        const heldout::groups gr(g);
        CHECK(gr.count() == 3);
        CHECK(ids(gr.ids()) == std::vector<std::uint32_t>{2, 0, 2, 1});
        CHECK(gr.describe(1) == "group 1 (id 42)");
    }
    TEST_CASE("intervals deduce a common time type and check order") {
        const std::vector<int> a{0, 1, 1, 3};
        const std::vector<long> b{2, 1, 5, 3};
        const heldout::intervals iv(a, b);
        static_assert(std::is_same_v<decltype(iv), const heldout::intervals<long>>);
        CHECK(iv.rows() == 4);
        CHECK(message_of([] {
                  heldout::intervals(std::vector<double>{0, 2, 1}, std::vector<double>{1, 3, 4});
              }) == "heldout::intervals: argument 't0': rows are not in time order (t0 decreases) at index 2");
        CHECK(message_of([] {
                  heldout::intervals(std::vector<double>{0, 2}, std::vector<double>{1, 1});
              }) == "heldout::intervals: argument 't1': interval ends before it starts (t1 < t0) at index 1");
        CHECK(message_of([] {
                  heldout::intervals(std::vector<double>{0, 2}, std::vector<double>{1});
              }) == "heldout::intervals: argument 't1': size 1 differs from size 2 of 't0'");
    }
    TEST_CASE("bad input: empty labels, bins, non-finite values") {
        CHECK(message_of([] { heldout::strata(std::vector<int>{}); }) ==
              "heldout::strata: argument 'labels': empty input (no rows)");
        CHECK(message_of([] { heldout::groups(std::vector<int>{}); }) ==
              "heldout::groups: argument 'ids': empty input (no rows)");
        CHECK(message_of([] {
                  heldout::strata(std::vector<double>{1, 2}, 0);
              }) == "heldout::strata: argument 'bins': must be at least 1");
        CHECK(message_of([] {
                  heldout::strata(std::vector<double>{1, 2}, 3);
              }) == "heldout::strata: argument 'bins': 3 bins exceed the 2 rows");
        CHECK(message_of([] {
                  heldout::strata(std::vector<double>{1, std::numeric_limits<double>::quiet_NaN()}, 1);
              }) == "heldout::strata: argument 'values': not finite (nan) at index 1");
    }
}
