// heldout/detail/label_scan.hpp — one fused pass over two label arrays: mismatches, or the
// sums that give a 2 x 2 table, and the largest label of each; byte labels go through
// 16-byte vector lanes, or 32 in the AVX2 clone. Internal: include the public headers instead.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/detail/labels.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <limits>
#include <span>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// One pass over two label arrays: number of mismatches (t != p) and, for k = 2,
/// sum(t), sum(p), sum(t & p); plus the largest label of each array.
struct label_scan {
    std::uint64_t mismatches = 0;
    std::uint64_t sum_t = 0;
    std::uint64_t sum_p = 0;
    std::uint64_t sum_tp = 0;
    std::uint64_t max_t = 0;
    std::uint64_t max_p = 0;
};

#if defined(__GNUC__) || defined(__clang__)
// Set when GCC vector extensions are available: the byte-lane kernels here and in
// detail/cell_count.hpp exist only then (the callers fall back to plain loops otherwise).
#define HELDOUT_DETAIL_LABEL_VECTORS 1
// 16 byte lanes (SSE2 / NEON width); the compiler lowers these generic vector operations
// for whatever the target has.
typedef unsigned char label_u8x16 __attribute__((vector_size(16)));

#if HELDOUT_DETAIL_HAS_AVX2_CLONE
// 32 byte lanes, for the AVX2 clones (here and in detail/cell_count.hpp).
typedef unsigned char label_u8x32 __attribute__((vector_size(32)));
#endif

// The helpers take and give 32-byte vectors by reference: by value they would change the
// ABI of a function compiled without AVX (GCC's -Wpsabi), though they are always inlined.
template <class V>
HELDOUT_DETAIL_INLINE void load_bytes(V& v, const unsigned char* p) noexcept {
    std::memcpy(&v, p, sizeof v);
}
/// m = max(m, a, b), lane by lane.
template <class V>
HELDOUT_DETAIL_INLINE void max_into(V& m, const V& a, const V& b) noexcept {
    const V ab = reinterpret_cast<V>(a > b);
    const V c = (a & ab) | (b & ~ab);
    const V mc = reinterpret_cast<V>(m > c);
    m = (m & mc) | (c & ~mc);
}
template <class V>
HELDOUT_DETAIL_INLINE std::uint64_t lane_sum(const V& v) noexcept {
    std::uint64_t s = 0;
    for (std::size_t l = 0; l < sizeof(V); ++l)
        s += v[l];
    return s;
}
template <class V>
HELDOUT_DETAIL_INLINE std::uint64_t lane_max(const V& v) noexcept {
    std::uint64_t s = 0;
    for (std::size_t l = 0; l < sizeof(V); ++l)
        s = std::max<std::uint64_t>(s, v[l]);
    return s;
}

/// Byte labels: counts in byte lanes of V (16 or 32 bytes), two vectors a step, flushed
/// every 255 steps before they can wrap. Binary = true also sums t, p and t & p (the four
/// cells of a 2 x 2 table); those sums hold only where both largest labels are <= 1, which
/// the caller checks before it uses them.
template <bool Binary, class V>
HELDOUT_DETAIL_INLINE label_scan scan_bytes_body(const unsigned char* t, const unsigned char* p,
                                                 std::size_t n) noexcept {
    constexpr std::size_t W = sizeof(V);
    label_scan r;
    V mt{}, mp{};
    std::size_t i = 0;
    while (n - i >= 2 * W) {
        const std::size_t steps = std::min<std::size_t>((n - i) / (2 * W), 255);
        V e0{}, e1{}, t0s{}, t1s{}, p0s{}, p1s{}, b0s{}, b1s{};
        for (std::size_t s = 0; s < steps; ++s, i += 2 * W) {
            V t0, t1, p0, p1;
            load_bytes(t0, t + i);
            load_bytes(t1, t + i + W);
            load_bytes(p0, p + i);
            load_bytes(p1, p + i + W);
            max_into(mt, t0, t1);
            max_into(mp, p0, p1);
            if constexpr (Binary) {
                t0s += t0;
                t1s += t1;
                p0s += p0;
                p1s += p1;
                b0s += t0 & p0;
                b1s += t1 & p1;
            } else {
                e0 -= reinterpret_cast<V>(t0 != p0); // a true lane is all ones (-1)
                e1 -= reinterpret_cast<V>(t1 != p1);
            }
        }
        if constexpr (Binary) {
            r.sum_t += lane_sum(t0s) + lane_sum(t1s);
            r.sum_p += lane_sum(p0s) + lane_sum(p1s);
            r.sum_tp += lane_sum(b0s) + lane_sum(b1s);
        } else {
            r.mismatches += lane_sum(e0) + lane_sum(e1);
        }
    }
    r.max_t = lane_max(mt);
    r.max_p = lane_max(mp);
    for (; i < n; ++i) {
        r.max_t = std::max<std::uint64_t>(r.max_t, t[i]);
        r.max_p = std::max<std::uint64_t>(r.max_p, p[i]);
        if constexpr (Binary) {
            r.sum_t += t[i];
            r.sum_p += p[i];
            r.sum_tp += t[i] & p[i];
        } else {
            r.mismatches += t[i] != p[i];
        }
    }
    return r;
}

template <bool Binary>
label_scan scan_bytes_baseline(const unsigned char* t, const unsigned char* p, std::size_t n) noexcept {
    return scan_bytes_body<Binary, label_u8x16>(t, p, n);
}

#if HELDOUT_DETAIL_HAS_AVX2_CLONE
// Why a clone: on an AMD EPYC (Zen 5, 2026-12-04) the 16-byte kernel ran classification error
// at 0.80-1.00x and the 2 x 2 table at 0.77-0.79x of bench_labels' plain sum of the same
// bytes; the counts are integers, so every clone gives the same result.
template <bool Binary>
HELDOUT_DETAIL_TARGET_AVX2 label_scan scan_bytes_avx2(const unsigned char* t, const unsigned char* p,
                                                      std::size_t n) noexcept {
    return scan_bytes_body<Binary, label_u8x32>(t, p, n);
}
#endif

/// scan_bytes_body in the best clone this CPU runs (or the one given).
template <bool Binary>
label_scan scan_bytes(const unsigned char* t, const unsigned char* p, std::size_t n, isa which = best_isa()) noexcept {
#if HELDOUT_DETAIL_HAS_AVX2_CLONE
    if (which != isa::baseline)
        return scan_bytes_avx2<Binary>(t, p, n);
#endif
    (void)which;
    return scan_bytes_baseline<Binary>(t, p, n);
}
#endif

/// The fused pass for any label types. Byte labels of either signedness (and bool) share
/// the byte-lane kernel: a negative int8 shows up as a byte >= 128, which the range check
/// after the pass rejects before anything is used.
template <bool Binary, class T, class P>
label_scan scan_labels(std::span<const T> t, std::span<const P> p, isa which = best_isa()) noexcept {
#ifdef HELDOUT_DETAIL_LABEL_VECTORS
    if constexpr (sizeof(T) == 1 && sizeof(P) == 1) {
        label_scan r = scan_bytes<Binary>(reinterpret_cast<const unsigned char*>(t.data()),
                                          reinterpret_cast<const unsigned char*>(p.data()), t.size(), which);
        if constexpr (std::is_signed_v<T>)
            if (r.max_t > 127)
                r.max_t = std::numeric_limits<std::uint64_t>::max();
        if constexpr (std::is_signed_v<P>)
            if (r.max_p > 127)
                r.max_p = std::numeric_limits<std::uint64_t>::max();
        return r;
    } else
#endif
    {
        (void)which;
        label_scan r;
        std::uint64_t mt = 0, mp = 0, a0 = 0, a1 = 0, a2 = 0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const std::uint64_t a = label_bits(t[i]), b = label_bits(p[i]);
            mt = std::max(mt, a);
            mp = std::max(mp, b);
            if constexpr (Binary) {
                a0 += a;
                a1 += b;
                a2 += a & b;
            } else {
                a0 += a != b;
            }
        }
        r.max_t = mt;
        r.max_p = mp;
        if constexpr (Binary) {
            r.sum_t = a0;
            r.sum_p = a1;
            r.sum_tp = a2;
        } else {
            r.mismatches = a0;
        }
        return r;
    }
}

} // namespace detail

HELDOUT_NAMESPACE_END
