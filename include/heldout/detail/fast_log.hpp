// heldout/detail/fast_log.hpp — a natural logarithm that GCC and Clang vectorise under
// strict floating-point flags (no -ffast-math), with the accuracy of a library log.
// Internal: used by measure::cross_entropy.
//
//   double a = heldout::detail::fast_log(0.3);    // log(0.3), error < 1 ulp
//   float  b = heldout::detail::fast_log(0.3f);   // logf(0.3f), error < 1 ulp
//   double c = heldout::detail::log_one_minus(1e-10);  // log(1 - p) with log1p's accuracy
//
// Method (fdlibm's e_log.c reduction; fdlibm's minimax coefficients in double, Taylor in float):
// x = 2^k m with m in [sqrt(2)/2, sqrt(2)), found with integer operations on the bits
// (std::bit_cast; subnormals are scaled by 2^54 first). With f = m - 1 and
// s = f / (2 + f), log(m) = 2 atanh(s) = 2s + s R(s^2), R(z) = sum_j 2 z^j / (2j + 1);
// 2s = f - s f and s f = hfsq - s hfsq (hfsq = f^2/2), so
//   log(x) = k ln2_hi - ((hfsq - (s (hfsq + R) + k ln2_lo)) - f),
// with ln 2 split so that k ln2_hi is exact. |s| <= 0.1716, s^2 <= 0.02944: fdlibm's seven
// minimax terms of R (double) leave an error below 2^-58.45, four Taylor terms (float)
// below 2^-28.
// The dominant term f is exact, so the result is within 1 ulp (tested against std::log
// on millions of points including subnormals and both ends of every binade). Every step
// is branch-free; special inputs are selected at the end: log(0) = -inf, log(+inf) = +inf,
// log(x < 0) = log(NaN) = NaN, as std::log.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/detail/isa.hpp> // HELDOUT_DETAIL_INLINE

#include <bit>
#include <cstdint>
#include <limits>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// R(z) ~ sum_j 2 z^j / (2j + 1) for z = s^2 in [0, 0.02944]: fdlibm's minimax polynomial
/// (e_log.c, Lg1..Lg7, |error| <= 2^-58.45), split into even and odd parts so that the two
/// halves run in parallel. Seven terms where the Taylor series needs ten for the same
/// accuracy: the double log-loss pass measured about 10 % faster.
HELDOUT_DETAIL_INLINE double log_series(double z) noexcept {
    constexpr double Lg1 = 6.666666666666735130e-01; // 0x3FE5555555555593
    constexpr double Lg2 = 3.999999999940941908e-01; // 0x3FD999999997FA04
    constexpr double Lg3 = 2.857142874366239149e-01; // 0x3FD2492494229359
    constexpr double Lg4 = 2.222219843214978396e-01; // 0x3FCC71C51D8E78AF
    constexpr double Lg5 = 1.818357216161805012e-01; // 0x3FC7466496CB03DE
    constexpr double Lg6 = 1.531383769920937332e-01; // 0x3FC39A09D078C69F
    constexpr double Lg7 = 1.479819860511658591e-01; // 0x3FC2F112DF3E5244
    const double w = z * z;
    const double t1 = w * (Lg2 + w * (Lg4 + w * Lg6));
    const double t2 = z * (Lg1 + w * (Lg3 + w * (Lg5 + w * Lg7)));
    return t2 + t1;
}

/// Natural log of a double, < 1 ulp, branch-free (vectorisable).
inline double fast_log(double x) noexcept {
    constexpr double ln2_hi = 6.93147180369123816490e-01;      // 0x3fe62e42fee00000: k * ln2_hi exact for |k| < 2^11
    constexpr double ln2_lo = 1.90821492927058770002e-10;      // ln 2 - ln2_hi
    constexpr std::uint64_t sqrt_half = 0x3fe6a09e667f3bcdULL; // bits of sqrt(2)/2
    // Every decision is an integer mask on the bits: with GCC's default -ftrapping-math a
    // floating-point comparison or a conditionally evaluated operation blocks
    // if-conversion, and so vectorisation.
    // SSE2 has no 64-bit integer comparison, so masks come from the sign bit of a
    // difference of two numbers below 2^63: below(a, b) is all ones where a < b.
    const auto below = [](std::uint64_t a, std::uint64_t b) { return -((a - b) >> 63); };
    const std::uint64_t ux = std::bit_cast<std::uint64_t>(x);
    const std::uint64_t sign = -(ux >> 63);
    const std::uint64_t ax = ux & 0x7fffffffffffffffULL;
    const std::uint64_t small = below(ax, 0x0010000000000000ULL); // +-0 and subnormals
    const double xs = x * std::bit_cast<double>(0x3ff0000000000000ULL + (small & (54ULL << 52)));
    std::uint64_t ix = std::bit_cast<std::uint64_t>(xs);
    ix += 0x3ff0000000000000ULL - sqrt_half; // moves the exponent up by one where m >= sqrt(2)
    const std::uint64_t e = (ix >> 52) & 0x7ff;
    ix = (ix & 0x000fffffffffffffULL) + sqrt_half;
    const double m = std::bit_cast<double>(ix);
    // int -> double through the mantissa of 2^52 (SSE2 has no 64-bit integer conversion).
    const double k = std::bit_cast<double>((e + 2048 - (small & 54)) | 0x4330000000000000ULL) - (0x1p52 + 3071.0);
    const double f = m - 1.0;
    const double s = f / (2.0 + f);
    const double z = s * s;
    const double R = log_series(z);
    const double hfsq = 0.5 * f * f;
    const double r = k * ln2_hi - ((hfsq - (s * (hfsq + R) + k * ln2_lo)) - f);
    // Specials: x >= +inf in bits is +inf, NaN or negative; then +-0.
    const std::uint64_t inf = 0x7ff0000000000000ULL;
    const std::uint64_t beyond = sign | ~below(ax, inf);                                    // negative, inf or NaN
    const std::uint64_t zero = below(ax, 1);                                                // +-0
    const std::uint64_t is_inf = below(ax ^ inf, 1) & ~sign;                                // +inf
    const std::uint64_t special = 0x7ff8000000000000ULL ^ (is_inf & 0x0008000000000000ULL); // NaN or +inf
    std::uint64_t rb = std::bit_cast<std::uint64_t>(r);
    rb = (rb & ~beyond) | (special & beyond);
    rb = (rb & ~zero) | (0xfff0000000000000ULL & zero); // -inf
    return std::bit_cast<double>(rb);
}

/// Natural log of a float, < 1 ulp in float, branch-free (vectorisable, 4 lanes in SSE2).
inline float fast_log(float x) noexcept {
    constexpr float ln2_hi = 6.9313812256e-01f; // 0x3f317180
    constexpr float ln2_lo = 9.0580006145e-06f; // 0x3717f7d1
    constexpr std::uint32_t sqrt_half = 0x3f3504f3u;
    const std::uint32_t ux = std::bit_cast<std::uint32_t>(x);
    const std::uint32_t small = -static_cast<std::uint32_t>(ux < 0x00800000u);
    const float xs = x * std::bit_cast<float>(0x3f800000u + (small & (25u << 23)));
    std::uint32_t ix = std::bit_cast<std::uint32_t>(xs);
    ix += 0x3f800000u - sqrt_half;
    const std::uint32_t e = (ix >> 23) & 0xff;
    ix = (ix & 0x007fffffu) + sqrt_half;
    const float m = std::bit_cast<float>(ix);
    const float k = std::bit_cast<float>((e + 256 - (small & 25u)) | 0x4b000000u) - (0x1p23f + 383.0f);
    const float f = m - 1.0f;
    const float s = f / (2.0f + f);
    const float z = s * s;
    const float R = z * ((2.0f / 3 + z * (2.0f / 5)) + (z * z) * (2.0f / 7 + z * (2.0f / 9)));
    const float hfsq = 0.5f * f * f;
    const float r = k * ln2_hi - ((hfsq - (s * (hfsq + R) + k * ln2_lo)) - f);
    const std::uint32_t inf = 0x7f800000u;
    const std::uint32_t beyond = -static_cast<std::uint32_t>(ux >= inf);
    const std::uint32_t zero = -static_cast<std::uint32_t>((ux << 1) == 0);
    const std::uint32_t special = ux == inf ? inf : 0x7fc00000u;
    std::uint32_t rb = std::bit_cast<std::uint32_t>(r);
    rb = (rb & ~beyond) | (special & beyond);
    rb = (rb & ~zero) | (0xff800000u & zero);
    return std::bit_cast<float>(rb);
}

/// The unsigned integer type as wide as T (float: 32 bits, double: 64 bits).
template <class T>
using same_width_uint = std::conditional_t<sizeof(T) == 8, std::uint64_t, std::uint32_t>;

/// A flag word whose top bit is set unless lo <= x <= hi, for 0 <= lo <= hi finite: the
/// bits compared as integers (ordered like the values for non-negative x; a negative x,
/// -0.0 included, or a NaN is flagged). Hot loops OR these words together and test the top
/// bit once per chunk: no floating-point compares, which GCC's vectoriser handles badly
/// under strict flags, and no shift per element.
template <class T>
HELDOUT_DETAIL_INLINE same_width_uint<T> outside_bits(T x, T lo, T hi) noexcept {
    using U = same_width_uint<T>;
    const U b = std::bit_cast<U>(x);
    // b < lo borrows in b - lo; b > hi (and every negative b) borrows in hi - b.
    return (b - std::bit_cast<U>(lo)) | (std::bit_cast<U>(hi) - b);
}

/// True when the top bit of a flag word is set.
template <class U>
constexpr bool flag_set(U w) noexcept {
    return (w >> (8 * sizeof(U) - 1)) != 0;
}

/// A flag word moved to the width of U, keeping its top bit.
template <class U, class V>
constexpr U flag_as(V w) noexcept {
    if constexpr (sizeof(V) > sizeof(U))
        return static_cast<U>(w >> (8 * (sizeof(V) - sizeof(U))));
    else
        return static_cast<U>(static_cast<U>(w) << (8 * (sizeof(U) - sizeof(V))));
}

/// log(x + tail) for a positive normal finite x (the smallest normal or more) and a tail
/// that is 0 or the exact rounding error of x = fl(1 - p) (then x + tail = 1 - p): the
/// reduction of fast_log without its handling of 0, subnormals, infinities and NaN, for
/// hot loops that route such inputs elsewhere (cross_entropy flags them per chunk).
/// With the tail, f = m - 1 becomes f + tail 2^-k, which is exact for 1 - p (it equals -p
/// for k = 0 and 1 - 2p for k = -1, both representable), so log(1 - p) keeps the < 1 ulp
/// accuracy of the log itself: log1p's accuracy without a division or a second log.
template <bool Tail, class T>
HELDOUT_DETAIL_INLINE T fast_log_normal_core(T x, T tail) noexcept {
    if constexpr (sizeof(T) == 8) {
        constexpr double ln2_hi = 6.93147180369123816490e-01, ln2_lo = 1.90821492927058770002e-10;
        constexpr std::uint64_t sqrt_half = 0x3fe6a09e667f3bcdULL;
        std::uint64_t ix = std::bit_cast<std::uint64_t>(static_cast<double>(x)) + (0x3ff0000000000000ULL - sqrt_half);
        const std::uint64_t e = ix >> 52; // k + 1023
        const double k = std::bit_cast<double>(e | 0x4330000000000000ULL) - (0x1p52 + 1023.0);
        ix = (ix & 0x000fffffffffffffULL) + sqrt_half;
        double f = std::bit_cast<double>(ix) - 1.0;
        if constexpr (Tail)
            f += static_cast<double>(tail) * std::bit_cast<double>((2046 - e) << 52); // tail 2^-k
        const double s = f / (2.0 + f);
        const double z = s * s;
        const double R = log_series(z);
        const double hfsq = 0.5 * f * f;
        return k * ln2_hi - ((hfsq - (s * (hfsq + R) + k * ln2_lo)) - f);
    } else {
        constexpr float ln2_hi = 6.9313812256e-01f, ln2_lo = 9.0580006145e-06f;
        constexpr std::uint32_t sqrt_half = 0x3f3504f3u;
        std::uint32_t ix = std::bit_cast<std::uint32_t>(static_cast<float>(x)) + (0x3f800000u - sqrt_half);
        const std::uint32_t e = ix >> 23; // k + 127
        const float k = std::bit_cast<float>(e | 0x4b000000u) - (0x1p23f + 127.0f);
        ix = (ix & 0x007fffffu) + sqrt_half;
        float f = std::bit_cast<float>(ix) - 1.0f;
        if constexpr (Tail)
            f += static_cast<float>(tail) * std::bit_cast<float>((254u - e) << 23);
        const float s = f / (2.0f + f);
        const float z = s * s;
        const float R = z * ((2.0f / 3 + z * (2.0f / 5)) + (z * z) * (2.0f / 7 + z * (2.0f / 9)));
        const float hfsq = 0.5f * f * f;
        return k * ln2_hi - ((hfsq - (s * (hfsq + R) + k * ln2_lo)) - f);
    }
}

/// Natural log of a positive normal finite x, < 1 ulp (see fast_log_normal_core).
template <class T>
HELDOUT_DETAIL_INLINE T fast_log_normal(T x) noexcept {
    return fast_log_normal_core<false>(x, T(0));
}

/// log(x + tail), x = fl(1 - p) normal and tail its exact rounding error (or 0).
template <class T>
HELDOUT_DETAIL_INLINE T fast_log_normal(T x, T tail) noexcept {
    return fast_log_normal_core<true>(x, tail);
}

/// log(1 - p) for p in [0, 1] with log1p's accuracy: u = fl(1 - p) is corrected by its
/// exact rounding error e = (1 - u) - p (Sterbenz), log(1 - p) = log(u) + e / u + O(e^2).
template <class T>
inline T log_one_minus(T p) noexcept {
    const T u = T(1) - p;
    const T err = (T(1) - u) - p; // exact; 0 whenever p >= 1/2 or u == 0
    // Where err != 0, u >= 1/2 and adding the smallest normal changes nothing; elsewhere it
    // keeps 0/0 away without a select (a select would stop vectorisation, see fast_log).
    return fast_log(u) + err / (u + std::numeric_limits<T>::min());
}

/// log(p) if y == 1, log(1 - p) if y == 0 (y in {0, 1} as T), branch-free, log1p-accurate.
template <class T>
inline T log_of_chosen(T y, T p) noexcept {
    const T ny = T(1) - y;
    const T q = ny + (y - ny) * p;       // exactly p or 1 - p
    const T err = ny * ((T(1) - q) - p); // rounding error of 1 - p (0 when y == 1)
    return fast_log(q) + err / (q + std::numeric_limits<T>::min());
}

} // namespace detail
HELDOUT_NAMESPACE_END
