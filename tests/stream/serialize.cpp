// Tests for heldout/stream/serialize.hpp: portable state bytes, exact merges across shards.
#include <heldout/measure/mean_loss.hpp>
#include <heldout/stream/serialize.hpp>

#include <doctest/doctest.h>

#include <cstring>
#include <random>
#include <span>
#include <vector>

namespace {
struct inner {
    std::vector<float> xs;
    std::int32_t k = -3;
    template <class F>
    void visit_state(F&& f) {
        f(xs);
        f(k);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(xs);
        f(k);
    }
};
struct every_field { // one member of each supported kind
    bool b = true;
    std::uint8_t u = 200;
    std::int64_t i = -5;
    float f = 1.5f;
    double d = -0.1;
    std::string s = "x,y";
    std::vector<double> v{1, 2, 3};
    std::vector<inner> nested{inner{{1.f}, 1}, inner{{}, 2}};
    template <class F>
    void visit_state(F&& fn) {
        fn(b), fn(u), fn(i), fn(f), fn(d), fn(s), fn(v), fn(nested);
    }
    template <class F>
    void visit_state(F&& fn) const {
        fn(b), fn(u), fn(i), fn(f), fn(d), fn(s), fn(v), fn(nested);
    }
};
} // namespace

TEST_SUITE("stream/serialize") {
    TEST_CASE("the documented layout: magic, version, schema, little-endian fields, hash") {
        auto acc = heldout::measure::mse{}.accumulator();
        acc.add_one(1.0, 0.0); // loss sum 1, carry 0, weight sum 1, carry 0, count 1
        const auto bytes = heldout::serialize(acc);
        REQUIRE(bytes.size() == 4 + 2 + 2 + 4 + 5 + 5 * 8 + 8);
        CHECK(std::memcmp(bytes.data(), "HDST", 4) == 0);
        CHECK(bytes[4] == std::byte{1});
        CHECK(bytes[8] == std::byte{5}); // schema length 5: "ddddu"
        CHECK(std::memcmp(bytes.data() + 12, "ddddu", 5) == 0);
        // first field: 1.0 as binary64 little-endian = 00 00 00 00 00 00 F0 3F (IEEE 754)
        CHECK(bytes[17 + 6] == std::byte{0xF0});
        CHECK(bytes[17 + 7] == std::byte{0x3F});
        CHECK(bytes[17 + 32] == std::byte{1}); // count = 1, low byte first
    }
    TEST_CASE("every supported field kind round-trips") {
        every_field e;
        e.nested[1].xs = {2.f, 3.f};
        const auto back = heldout::deserialize<every_field>(heldout::serialize(e));
        CHECK(back.b == e.b);
        CHECK(back.u == e.u);
        CHECK(back.i == e.i);
        CHECK(back.f == e.f);
        CHECK(back.d == e.d);
        CHECK(back.s == e.s);
        CHECK(back.v == e.v);
        REQUIRE(back.nested.size() == 2);
        CHECK(back.nested[1].xs == std::vector<float>{2.f, 3.f});
        CHECK(back.nested[1].k == 2);
    }
    TEST_CASE("shards serialised, deserialised and merged equal one machine's result") {
        std::mt19937_64 g(11);
        std::normal_distribution<double> d;
        std::vector<double> y(3000), f(3000);
        for (std::size_t i = 0; i < y.size(); ++i) { y[i] = d(g); f[i] = d(g); }
        auto whole = heldout::measure::mse{}.accumulator();
        whole.add(y, f);
        auto a = heldout::measure::mse{}.accumulator();
        auto b = heldout::measure::mse{}.accumulator();
        a.add(std::span(y).first(1000), std::span(f).first(1000));
        b.add(std::span(y).subspan(1000), std::span(f).subspan(1000));
        using A = decltype(a);
        auto a2 = heldout::deserialize<A>(heldout::serialize(a));
        auto b2 = heldout::deserialize<A>(heldout::serialize(b));
        a.merge(b);
        a2.merge(b2);
        CHECK(a2.value() == a.value()); // bit-identical to merging in memory
        CHECK(a2.value() == doctest::Approx(whole.value()).epsilon(1e-15));
    }
    TEST_CASE("corrupt, truncated or foreign bytes are refused with a reason") {
        auto acc = heldout::measure::mse{}.accumulator();
        acc.add_one(2.0, 1.0);
        auto bytes = heldout::serialize(acc);
        using A = decltype(acc);
        auto flipped = bytes;
        flipped[20] ^= std::byte{1};
        CHECK_THROWS_WITH_AS(heldout::deserialize<A>(flipped),
                             "heldout::deserialize: argument 'bytes': checksum mismatch (corrupted or truncated state)",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::deserialize<A>(std::span(bytes).first(10)), heldout::input_error);
        auto magic = bytes;
        magic[0] = std::byte{'X'};
        CHECK_THROWS_WITH_AS(heldout::deserialize<A>(magic),
                             "heldout::deserialize: argument 'bytes': not a heldout state (bad magic)",
                             heldout::input_error);
        const auto other = heldout::serialize(every_field{});
        CHECK_THROWS_AS(heldout::deserialize<A>(other), heldout::input_error);
    }
}
