// Tests for heldout/plan/walk_forward.hpp: rolling-origin evaluation.
#include <heldout/plan/walk_forward.hpp>

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
std::vector<std::size_t> iota(std::size_t a, std::size_t b) {
    std::vector<std::size_t> out;
    for (std::size_t i = a; i < b; ++i)
        out.push_back(i);
    return out;
}

// A negative gap cannot be written in a braced initialiser (narrowing).
template <class T>
concept takes_negative_gap = requires(int g) {
    T{.gap = g};
};
template <class T>
concept takes_negative_gap_constant = requires {
    T{.gap = -1};
};
static_assert(!takes_negative_gap<heldout::walk_forward>);
static_assert(!takes_negative_gap_constant<heldout::walk_forward>);
} // namespace

TEST_SUITE("plan/walk_forward") {
    TEST_CASE("Tashman 2000 rolling origin, worked by hand: T = 10, o_1 = 4, H = 2, s = 2, expanding") {
        // Tashman (2000), rolling origin; check values worked by hand from the definition in the paper:
        // train [0,4) / test [4,6), train [0,6) / test [6,8), train [0,8) / test [8,10).
        auto r = heldout::walk_forward{.initial = 4, .horizon = 2, .step = 2}.splits(10);
        REQUIRE(r.size() == 3); // floor((10 - 4 - 0 - 2) / 2) + 1
        CHECK(v(r.split(0).train) == iota(0, 4));
        CHECK(v(r.split(0).test) == iota(4, 6));
        CHECK(v(r.split(1).train) == iota(0, 6));
        CHECK(v(r.split(1).test) == iota(6, 8));
        CHECK(v(r.split(2).train) == iota(0, 8));
        CHECK(v(r.split(2).test) == iota(8, 10));
    }
    TEST_CASE("sliding window and gap") {
        auto r = heldout::walk_forward{.initial = 5, .horizon = 2, .step = 3, .gap = 1, .window = 3}.splits(16);
        // origins 5, 8, 11 (11 + 1 + 2 = 14 <= 16; 14 + 3 > 16 stops): floor((16-5-1-2)/3)+1 = 3
        REQUIRE(r.size() == 3);
        CHECK(v(r.split(0).train) == iota(2, 5));
        CHECK(v(r.split(0).test) == iota(6, 8));
        CHECK(v(r.split(2).train) == iota(8, 11));
        CHECK(v(r.split(2).test) == iota(12, 14));
    }
    TEST_CASE("property: never tests before it trains; the gap is respected, random sizes") {
        std::mt19937_64 gen(12);
        for (int trial = 0; trial < 50; ++trial) {
            const std::size_t n = 5 + gen() % 200;
            const std::size_t initial = 1 + gen() % (n / 2);
            const std::size_t horizon = 1 + gen() % 5, gap = gen() % 3, step = 1 + gen() % 4;
            const std::size_t window = gen() % 2 ? 0 : 1 + gen() % initial;
            if (initial + gap + horizon > n)
                continue;
            auto r =
                heldout::walk_forward{
                    .initial = initial, .horizon = horizon, .step = step, .gap = gap, .window = window}
                    .splits(n);
            CHECK(r.size() == (n - initial - gap - horizon) / step + 1);
            for (const heldout::split& s : r) {
                CHECK(s.train.back() + gap < s.test.front());
                CHECK(s.test.size() == horizon);
                CHECK(s.test.back() < n);
                if (window > 0)
                    CHECK(s.train.size() == window);
                CHECK_NOTHROW(heldout::check_time_order(s, gap));
            }
        }
    }
    TEST_CASE("bad input names the member") {
        CHECK(message_of([] { heldout::walk_forward{.initial = 8, .horizon = 3}.splits(10); }) ==
              "heldout::walk_forward: argument 'horizon': runs past the end: initial 8 + gap 0 + horizon 3 "
              "exceeds the 10 rows");
        CHECK(message_of([] { heldout::walk_forward{.initial = 0}.splits(10); }) ==
              "heldout::walk_forward: argument 'initial': the first training set needs at least 1 row");
        CHECK(message_of([] { heldout::walk_forward{.initial = 2, .horizon = 0}.splits(10); }) ==
              "heldout::walk_forward: argument 'horizon': must be at least 1");
        CHECK(message_of([] { heldout::walk_forward{.initial = 2, .step = 0}.splits(10); }) ==
              "heldout::walk_forward: argument 'step': must be at least 1");
        CHECK(message_of([] { heldout::walk_forward{.initial = 2, .window = 3}.splits(10); }) ==
              "heldout::walk_forward: argument 'window': sliding window of 3 rows is longer than the 2 initial rows");
        heldout::walk_forward w{.initial = 2};
        const int minus_one = -1;
        w.gap = static_cast<std::size_t>(minus_one); // what a negative assignment does to an unsigned member
        CHECK(message_of([&] { w.splits(10); }) ==
              "heldout::walk_forward: argument 'gap': negative (wrapped to unsigned: 18446744073709551615)");
    }
    TEST_CASE("a gap that leaves no test row is named as the gap") {
        // initial 8 + horizon 1 fits in 10 rows; a gap of 2 pushes the only test row past the end.
        CHECK(message_of([] { heldout::walk_forward{.initial = 8, .horizon = 1, .gap = 2}.splits(10); }) ==
              "heldout::walk_forward: argument 'gap': leaves no test row: initial 8 + gap 2 + horizon 1 exceeds the "
              "10 rows");
        CHECK(heldout::walk_forward{.initial = 8, .horizon = 1, .gap = 1}.splits(10).size() == 1); // row 9
    }
}
