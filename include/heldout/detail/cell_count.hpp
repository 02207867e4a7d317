// heldout/detail/cell_count.hpp — the k x k cell counts of byte labels for 3 <= k <= 8, in
// byte lanes (16-byte vectors, or 32 in the AVX2 clone), with the label range check fused in.
// Internal: include the public headers instead.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/detail/label_scan.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

#ifdef HELDOUT_DETAIL_LABEL_VECTORS
/// Byte labels, 3 <= K <= 8 classes: the cell code (t << 4) | p of W rows at a time (W = 16,
/// or 32 in the AVX2 clone) is compared with each cell code and counted in byte lanes. The
/// rows go in blocks of 255 steps (then the byte counters are flushed, before they can wrap;
/// a block of both arrays is at most 16 KiB, so it stays in L1), and each block is read
/// once per group of at most 12 cells: 12 counters, the code and the loads fit the 16 vector
/// registers, where all K^2 counters at once spilled to memory (measured at K = 5, 1e6 rows:
/// 0.29 ms in groups against 0.34 ms without, AVX2; SSE2 0.44 ms either way). The high
/// nibbles of t | p are collected on the side: a label >= 16 would alias a cell, so the
/// counts are only used when none is seen. Returns false when a label is >= K (then the
/// caller falls back and reports or grows). out: K x K counts, row-major.
/// V is a GCC vector of unsigned char; no function here takes or returns one by value (a
/// 32-byte vector argument outside an AVX function would change the ABI).
template <class V, std::size_t K, std::size_t First, bool High, std::size_t... I>
HELDOUT_DETAIL_INLINE void count_cell_group(const unsigned char* t, const unsigned char* p, std::size_t steps,
                                            std::uint64_t* total, V& high, std::index_sequence<I...>) noexcept {
    constexpr std::size_t W = sizeof(V);
    V cnt[sizeof...(I)] = {};
    for (std::size_t s = 0; s < steps; ++s) {
        V a, b;
        std::memcpy(&a, t + s * W, W);
        std::memcpy(&b, p + s * W, W);
        if constexpr (High)
            high |= a | b;
        const V code = (a << 4) | b;
        // cnt[I] += (code == cell code of First + I); a true lane is all ones (-1)
        ((cnt[I] -=
          reinterpret_cast<V>(code == static_cast<unsigned char>((((First + I) / K) << 4) | ((First + I) % K)))),
         ...);
    }
    for (std::size_t c = 0; c < sizeof...(I); ++c)
        for (std::size_t l = 0; l < W; ++l)
            total[First + c] += cnt[c][l];
}

inline constexpr std::size_t cell_group = 12;

template <class V, std::size_t K, std::size_t First = 0>
HELDOUT_DETAIL_INLINE void count_cell_groups(const unsigned char* t, const unsigned char* p, std::size_t steps,
                                             std::uint64_t* total, V& high) noexcept {
    constexpr std::size_t left = K * K - First;
    constexpr std::size_t count = left < cell_group ? left : cell_group;
    count_cell_group<V, K, First, First == 0>(t, p, steps, total, high, std::make_index_sequence<count>{});
    if constexpr (First + count < K * K)
        count_cell_groups<V, K, First + count>(t, p, steps, total, high);
}

template <class V, std::size_t K>
HELDOUT_DETAIL_INLINE bool count_bytes_small_body(const unsigned char* t, const unsigned char* p, std::size_t n,
                                                  std::uint64_t* out) noexcept {
    constexpr std::size_t KK = K * K;
    constexpr std::size_t W = sizeof(V);
    std::uint64_t total[KK] = {};
    V high{};
    std::size_t i = 0;
    while (n - i >= W) {
        const std::size_t steps = std::min<std::size_t>((n - i) / W, 255);
        count_cell_groups<V, K>(t + i, p + i, steps, total, high);
        i += steps * W;
    }
    unsigned char seen = 0;
    for (std::size_t l = 0; l < W; ++l)
        seen |= high[l];
    bool ok = (seen >> 4) == 0;
    for (; i < n; ++i) {
        if (t[i] >= K || p[i] >= K)
            ok = false;
        else
            ++total[t[i] * K + p[i]];
    }
    std::uint64_t counted = 0;
    for (std::size_t v = 0; v < KK; ++v) {
        out[v] = total[v];
        counted += total[v];
    }
    return ok && counted == n; // rows with a label in K..15 matched no cell
}

template <std::size_t K>
bool count_bytes_small_baseline(const unsigned char* t, const unsigned char* p, std::size_t n,
                                std::uint64_t* out) noexcept {
    return count_bytes_small_body<label_u8x16, K>(t, p, n, out);
}

#if HELDOUT_DETAIL_HAS_AVX2_CLONE
template <std::size_t K>
HELDOUT_DETAIL_TARGET_AVX2 bool count_bytes_small_avx2(const unsigned char* t, const unsigned char* p, std::size_t n,
                                                       std::uint64_t* out) noexcept {
    return count_bytes_small_body<label_u8x32, K>(t, p, n, out);
}
#endif

/// count_bytes_small_body in the best clone this CPU runs (or the one given).
template <std::size_t K>
bool count_bytes_small(const unsigned char* t, const unsigned char* p, std::size_t n, std::uint64_t* out,
                       isa which = best_isa()) noexcept {
#if HELDOUT_DETAIL_HAS_AVX2_CLONE
    if (which != isa::baseline)
        return count_bytes_small_avx2<K>(t, p, n, out);
#endif
    (void)which;
    return count_bytes_small_baseline<K>(t, p, n, out);
}
#endif

} // namespace detail

HELDOUT_NAMESPACE_END
