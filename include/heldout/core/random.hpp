// heldout/core/random.hpp — heldout's own seeded generator, documented bit for bit, so
// that the same seed gives the same splits and bootstrap draws on every compiler and
// standard library (std::uniform_int_distribution and std::shuffle are not portable).
//
//   heldout::rng g(42);                 // seed
//   heldout::rng h(42, 3);              // seed, stream: independent stream 3 of seed 42
//   std::uint64_t x = g();              // 64 random bits
//   std::uint64_t k = g.below(10);      // uniform in [0, 10)
//   double u = g.uniform();             // uniform in [0, 1), 53 bits
//   heldout::shuffle(std::span<std::size_t>(v), g);
//
// The contract (frozen; changing it changes every pinned split):
//  * splitmix64 (Steele, Lea & Flood 2014): z += 0x9E3779B97F4A7C15;
//    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9; z = (z ^ (z >> 27)) * 0x94D049BB133111EB;
//    return z ^ (z >> 31).
//  * rng(seed, stream): a splitmix64 state starts at seed ^ mix(stream), where
//    mix(s) = the first splitmix64 output from state s; its next four outputs are the
//    xoshiro256** state s[0..3]. rng(seed) is rng(seed, 0).
//  * xoshiro256** (Blackman & Vigna 2018): result = rotl(s[1] * 5, 7) * 9, then the
//    published state update with rotl(s[3], 45).
//  * below(n): Lemire's nearly divisionless method (Lemire 2019, ACM TOMACS 29(1):3):
//    m = x * n as 128 bits; if low(m) < n, reject while low(m) < (2^64 - n) mod n, with a
//    fresh x each time; result = high(m). below(0) is an error.
//  * uniform(): (x >> 11) * 2^-53.
//  * shuffle: Fisher–Yates from the back: for i = n-1 down to 1, j = below(i + 1), swap(v[i], v[j]).
#pragma once

#include <heldout/core/error.hpp>

#include <cstddef>
#include <cstdint>
#include <span>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

namespace detail {
constexpr std::uint64_t splitmix64_next(std::uint64_t& z) noexcept {
    z += 0x9E3779B97F4A7C15ULL;
    std::uint64_t r = z;
    r = (r ^ (r >> 30)) * 0xBF58476D1CE4E5B9ULL;
    r = (r ^ (r >> 27)) * 0x94D049BB133111EBULL;
    return r ^ (r >> 31);
}
constexpr std::uint64_t rotl(std::uint64_t x, int k) noexcept { return (x << k) | (x >> (64 - k)); }

/// The full 128-bit product x * n as (high, low) 64-bit halves.
constexpr void mul_wide(std::uint64_t x, std::uint64_t n, std::uint64_t& hi, std::uint64_t& lo) noexcept {
#if defined(__SIZEOF_INT128__)
    __extension__ typedef unsigned __int128 u128;
    const u128 m = static_cast<u128>(x) * n;
    hi = static_cast<std::uint64_t>(m >> 64);
    lo = static_cast<std::uint64_t>(m);
#else
    const std::uint64_t x0 = x & 0xFFFFFFFFu, x1 = x >> 32, n0 = n & 0xFFFFFFFFu, n1 = n >> 32;
    const std::uint64_t p00 = x0 * n0, p01 = x0 * n1, p10 = x1 * n0, p11 = x1 * n1;
    const std::uint64_t mid = (p00 >> 32) + (p01 & 0xFFFFFFFFu) + (p10 & 0xFFFFFFFFu);
    hi = p11 + (p01 >> 32) + (p10 >> 32) + (mid >> 32);
    lo = (mid << 32) | (p00 & 0xFFFFFFFFu);
#endif
}
} // namespace detail

/// xoshiro256** seeded through splitmix64; see the header comment for the exact contract.
class rng {
public:
    using result_type = std::uint64_t;

    constexpr explicit rng(std::uint64_t seed = 0, std::uint64_t stream = 0) noexcept {
        std::uint64_t m = stream;
        std::uint64_t z = seed ^ detail::splitmix64_next(m);
        for (auto& w : s_)
            w = detail::splitmix64_next(z);
    }

    static constexpr result_type min() noexcept { return 0; }
    static constexpr result_type max() noexcept { return ~std::uint64_t{0}; }

    constexpr result_type operator()() noexcept {
        const std::uint64_t result = detail::rotl(s_[1] * 5, 7) * 9;
        const std::uint64_t t = s_[1] << 17;
        s_[2] ^= s_[0];
        s_[3] ^= s_[1];
        s_[1] ^= s_[2];
        s_[0] ^= s_[3];
        s_[2] ^= t;
        s_[3] = detail::rotl(s_[3], 45);
        return result;
    }

    /// Uniform integer in [0, n), Lemire's method; n must be positive.
    std::uint64_t below(std::uint64_t n) {
        if (n == 0)
            detail::fail("heldout::rng::below", "n", "bound must be positive");
        std::uint64_t hi = 0, low = 0;
        detail::mul_wide((*this)(), n, hi, low);
        if (low < n) {
            const std::uint64_t threshold = (0 - n) % n;
            while (low < threshold)
                detail::mul_wide((*this)(), n, hi, low);
        }
        return hi;
    }

    /// Uniform double in [0, 1) with 53 random bits.
    constexpr double uniform() noexcept { return static_cast<double>((*this)() >> 11) * 0x1.0p-53; }

    friend constexpr bool operator==(const rng&, const rng&) = default;

private:
    std::uint64_t s_[4]{};
};

/// Fisher–Yates shuffle with heldout's generator (portable, unlike std::shuffle).
template <class T>
void shuffle(std::span<T> v, rng& g) {
    for (std::size_t i = v.size(); i > 1; --i) {
        const std::size_t j = static_cast<std::size_t>(g.below(i));
        using std::swap;
        swap(v[i - 1], v[j]);
    }
}

HELDOUT_NAMESPACE_END
