// heldout/detail/label_scan.hpp — one fused pass over two label arrays: mismatches, or the
// sums that give a 2 x 2 table, and the largest label of each; byte labels go through
// 16-byte vector lanes. Internal: include the public headers instead.
#pragma once

#include <heldout/core/config.hpp>
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

inline label_u8x16 load_u8x16(const unsigned char* p) noexcept {
    label_u8x16 v;
    std::memcpy(&v, p, sizeof v);
    return v;
}
inline label_u8x16 max_u8x16(label_u8x16 a, label_u8x16 b) noexcept {
    const label_u8x16 m = reinterpret_cast<label_u8x16>(a > b);
    return (a & m) | (b & ~m);
}
inline std::uint64_t lane_sum(label_u8x16 v) noexcept {
    std::uint64_t s = 0;
    for (int l = 0; l < 16; ++l)
        s += v[l];
    return s;
}
inline std::uint64_t lane_max(label_u8x16 v) noexcept {
    std::uint64_t s = 0;
    for (int l = 0; l < 16; ++l)
        s = std::max<std::uint64_t>(s, v[l]);
    return s;
}

/// Byte labels: counts in byte lanes, flushed every 255 steps before they can wrap.
/// Binary = true also sums t, p and t & p (the four cells of a 2 x 2 table).
template <bool Binary>
label_scan scan_bytes(const unsigned char* t, const unsigned char* p, std::size_t n) noexcept {
    label_scan r;
    label_u8x16 mt{}, mp{};
    std::size_t i = 0;
    while (n - i >= 32) {
        const std::size_t steps = std::min<std::size_t>((n - i) / 32, 255);
        label_u8x16 e0{}, e1{}, t0s{}, t1s{}, p0s{}, p1s{}, b0s{}, b1s{};
        for (std::size_t s = 0; s < steps; ++s, i += 32) {
            const label_u8x16 t0 = load_u8x16(t + i), t1 = load_u8x16(t + i + 16);
            const label_u8x16 p0 = load_u8x16(p + i), p1 = load_u8x16(p + i + 16);
            mt = max_u8x16(mt, max_u8x16(t0, t1));
            mp = max_u8x16(mp, max_u8x16(p0, p1));
            if constexpr (Binary) {
                t0s += t0;
                t1s += t1;
                p0s += p0;
                p1s += p1;
                b0s += t0 & p0;
                b1s += t1 & p1;
            } else {
                e0 -= reinterpret_cast<label_u8x16>(t0 != p0); // a true lane is all ones (-1)
                e1 -= reinterpret_cast<label_u8x16>(t1 != p1);
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
#endif

/// The fused pass for any label types. Byte labels of either signedness (and bool) share
/// the byte-lane kernel: a negative int8 shows up as a byte >= 128, which the range check
/// after the pass rejects before anything is used.
template <bool Binary, class T, class P>
label_scan scan_labels(std::span<const T> t, std::span<const P> p) noexcept {
#ifdef HELDOUT_DETAIL_LABEL_VECTORS
    if constexpr (sizeof(T) == 1 && sizeof(P) == 1) {
        label_scan r = scan_bytes<Binary>(reinterpret_cast<const unsigned char*>(t.data()),
                                          reinterpret_cast<const unsigned char*>(p.data()), t.size());
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
