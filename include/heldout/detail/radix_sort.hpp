// heldout/detail/radix_sort.hpp — stable LSD radix sort of float/double scores by their bit
// pattern, carrying a payload (a 0/1 label, or a row index) along.
// Internal: include the public headers instead.
//
// Why: exact AUC, DeLong, curves and the bootstrap of AUC all cost one sort; an LSD radix
// sort on the order-preserving key of a float is several times faster than std::sort
// (perf-notes: 0.18-0.23x for float32 with the label carried along).
//
// Key transform (order_key): the IEEE bit pattern u, with -0 folded onto +0 first (so the
// two zeros form one tie group, as they compare equal); if the sign bit is set, all bits are
// flipped, else only the sign bit. Then a < b as numbers iff key(a) < key(b) as unsigned
// integers, for all non-NaN values (NaN is rejected before, by the callers).
// Passes: digits of 11 bits from the least significant end (32-bit keys: 11+11+10 bits = 3
// passes; 64-bit keys: 6 passes). One read pass first builds the histograms of every digit
// (callers fuse it into their key-making pass); a pass whose digit is the same for every key
// (all counts in one bucket) is skipped. Double scores are normally not sorted on 64-bit keys:
// detail/ranks.hpp sorts them on a fitted 32-bit key (8-bit digits) and orders the runs of
// equal keys by the rest of the score.
#pragma once

#include <heldout/core/config.hpp>

#include <algorithm>
#include <array>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <new>
#include <type_traits>
#include <utility>

#if defined(__linux__)
#include <sys/mman.h>
#endif

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// The unsigned key type of a float (32 bits) or double (64 bits).
template <class T>
using radix_key_t = std::conditional_t<sizeof(T) == 4, std::uint32_t, std::uint64_t>;

/// Order-preserving unsigned key of a non-NaN float; -0 and +0 map to the same key.
inline std::uint32_t order_key(float x) noexcept {
    const std::uint32_t u = std::bit_cast<std::uint32_t>(x + 0.0f); // -0 + 0 = +0
    const std::uint32_t mask = (0u - (u >> 31)) | 0x80000000u;
    return u ^ mask;
}
inline std::uint64_t order_key(double x) noexcept {
    const std::uint64_t u = std::bit_cast<std::uint64_t>(x + 0.0);
    const std::uint64_t mask = (std::uint64_t{0} - (u >> 63)) | 0x8000000000000000ull;
    return u ^ mask;
}

/// The score a key came from (the inverse of order_key; -0 comes back as +0).
inline float key_score(std::uint32_t k) noexcept {
    return std::bit_cast<float>((k & 0x80000000u) ? (k ^ 0x80000000u) : ~k);
}
inline double key_score(std::uint64_t k) noexcept {
    return std::bit_cast<double>((k & 0x8000000000000000ull) ? (k ^ 0x8000000000000000ull) : ~k);
}

/// Digit width: 11 bits (2048 four-byte counters stay in L1; three passes for 32-bit keys).
/// Measured on float32 keys with a 1-byte label at 1e6 and 1e7 rows: 8-bit digits (4 passes)
/// within noise of 11, 16-bit digits (2 passes) 1.5x slower at 1e6.
template <class K>
inline constexpr int radix_digit_bits = 11;

/// Digit layout of a radix sort over the low KeyBits bits of keys K (all bits by default).
template <class K, int Bits = radix_digit_bits<K>, int KeyBits = static_cast<int>(sizeof(K)) * 8>
struct radix_layout {
    static_assert(KeyBits > 0 && KeyBits <= static_cast<int>(sizeof(K)) * 8);
    static constexpr int bits = Bits;
    static constexpr int passes = (KeyBits + bits - 1) / bits;
    static constexpr std::size_t buckets = std::size_t{1} << bits;
    static constexpr K mask = static_cast<K>(buckets - 1);
    static constexpr std::size_t histogram_size = static_cast<std::size_t>(passes) * buckets;

    /// Counts key k in every pass's histogram (hist has histogram_size zeroed entries).
    static void count(std::uint32_t* __restrict hist, K k) noexcept {
        for (int p = 0; p < passes; ++p)
            ++hist[static_cast<std::size_t>(p) * buckets + static_cast<std::size_t>((k >> (p * bits)) & mask)];
    }
};

/// The passes of both sorts below: with Payload, payload[0, n) follows the keys.
template <int Bits, int KeyBits, bool Payload, class K, class P>
bool radix_passes(K* __restrict keys, K* __restrict key_tmp, P* __restrict payload, P* __restrict payload_tmp,
                  std::size_t n, std::uint32_t* __restrict hist, bool counted) noexcept {
    static_assert(std::is_unsigned_v<K>);
    using layout = radix_layout<K, Bits, KeyBits>;
    constexpr int bits = layout::bits;
    constexpr std::size_t buckets = layout::buckets;
    constexpr K mask = layout::mask;
    if (n < 2)
        return false;
    if (!counted) {
        std::fill(hist, hist + layout::histogram_size, 0u);
        for (std::size_t i = 0; i < n; ++i)
            layout::count(hist, keys[i]);
    }
    bool in_tmp = false;
    K* src_k = keys;
    K* dst_k = key_tmp;
    P* src_p = payload;
    P* dst_p = payload_tmp;
    for (int p = 0; p < layout::passes; ++p) {
        std::uint32_t* h = hist + static_cast<std::size_t>(p) * buckets;
        const int shift = p * bits;
        // Constant digit: this pass would not move anything.
        if (h[static_cast<std::size_t>((src_k[0] >> shift) & mask)] == n)
            continue;
        std::uint32_t sum = 0;
        for (std::size_t d = 0; d < buckets; ++d) {
            const std::uint32_t c0 = h[d];
            h[d] = sum;
            sum += c0;
        }
        for (std::size_t i = 0; i < n; ++i) {
            const K k = src_k[i];
            const std::uint32_t pos = h[static_cast<std::size_t>((k >> shift) & mask)]++;
            dst_k[pos] = k;
            if constexpr (Payload)
                dst_p[pos] = src_p[i];
        }
        std::swap(src_k, dst_k);
        std::swap(src_p, dst_p);
        in_tmp = !in_tmp;
    }
    return in_tmp;
}

/// Sorts keys[0, n) ascending and stably, applying the same permutation to payload[0, n).
/// key_tmp and payload_tmp are scratch of the same length; hist holds
/// radix_layout<K, Bits>::histogram_size counts, already filled by radix_layout::count over
/// the keys when `counted` (so the caller's own pass over the data builds them), else
/// overwritten here. Returns true when the sorted result ended in the scratch buffers,
/// false when it is in keys/payload. n < 2^32.
template <int Bits = 0, class K, class P>
bool radix_sort(K* __restrict keys, K* __restrict key_tmp, P* __restrict payload, P* __restrict payload_tmp,
                std::size_t n, std::uint32_t* __restrict hist, bool counted) noexcept {
    return radix_passes < Bits ? Bits : radix_digit_bits<K>, static_cast<int>(sizeof(K)) * 8,
           true > (keys, key_tmp, payload, payload_tmp, n, hist, counted);
}

/// Sorts keys[0, n) ascending on their low KeyBits bits (the rest must be zero), without a
/// payload: for keys that carry their payload in their low bits, such as a float's 32-bit
/// order key shifted left by one with a 0/1 label below it (33 bits: 3 passes of 11 bits).
/// Why: one 8-byte scatter stream per pass instead of a 4-byte and a 1-byte one measured
/// 0.17-0.18x of std::sort of the floats at 1e7 rows instead of 0.21x (2026-12, this VM).
/// hist as in radix_sort, with radix_layout<K, 11, KeyBits>. Returns true when the result is
/// in tmp.
template <int KeyBits, class K>
bool radix_sort_keys(K* __restrict keys, K* __restrict tmp, std::size_t n, std::uint32_t* __restrict hist,
                     bool counted) noexcept {
    return radix_passes<radix_digit_bits<K>, KeyBits, false, K, K>(keys, tmp, nullptr, nullptr, n, hist, counted);
}

/// The same with its own histogram storage (on the stack: at most 48 KiB).
template <int Bits = 0, class K, class P>
bool radix_sort(K* __restrict keys, K* __restrict key_tmp, P* __restrict payload, P* __restrict payload_tmp,
                std::size_t n) noexcept {
    std::array<std::uint32_t, radix_layout<K, Bits ? Bits : radix_digit_bits<K>>::histogram_size> hist;
    return radix_sort<Bits>(keys, key_tmp, payload, payload_tmp, n, hist.data(), false);
}

/// Growable, uninitialised scratch that keeps its capacity (no allocation once large
/// enough); copying gives empty scratch, since its content is never state. Large buffers are
/// 2 MiB aligned and, on Linux, advised to use transparent huge pages: a radix pass scatters
/// into 2048 places at once, and 4 KiB pages made it TLB-bound (about 15 % slower at 1e7).
template <class T>
class scratch_buffer {
    static_assert(std::is_trivially_default_constructible_v<T> && std::is_trivially_destructible_v<T>);
    static constexpr std::size_t huge = std::size_t{1} << 21;

    struct release {
        std::size_t align = 0;
        void operator()(T* p) const noexcept { ::operator delete (static_cast<void*>(p), std::align_val_t{align}); }
    };

public:
    scratch_buffer() = default;
    scratch_buffer(const scratch_buffer&) noexcept {}
    scratch_buffer& operator=(const scratch_buffer&) noexcept { return *this; }
    scratch_buffer(scratch_buffer&&) noexcept = default;
    scratch_buffer& operator=(scratch_buffer&&) noexcept = default;

    /// At least n elements, contents unspecified.
    T* get(std::size_t n) {
        if (n > capacity_) {
            data_.reset();
            const std::size_t bytes = n * sizeof(T);
            const std::size_t align = bytes >= 2 * huge ? huge : alignof(std::max_align_t);
            const std::size_t rounded = (bytes + align - 1) / align * align;
            void* p = ::operator new (rounded, std::align_val_t{align});
#if defined(__linux__) && defined(MADV_HUGEPAGE)
            if (align == huge)
                (void)::madvise(p, rounded, MADV_HUGEPAGE); // a hint: failure only costs speed
#endif
            data_ = std::unique_ptr<T[], release>(static_cast<T*>(p), release{align});
            capacity_ = n;
        }
        return data_.get();
    }
    std::size_t capacity() const noexcept { return capacity_; }

private:
    std::unique_ptr<T[], release> data_;
    std::size_t capacity_ = 0;
};

/// Keys and payloads of one sort, with their scratch: sort() leaves the result in key()/payload().
/// Bits: the digit width (see radix_digit_bits).
template <class K, class P, int Bits = radix_digit_bits<K>>
struct radix_buffers {
    using layout = radix_layout<K, Bits>;
    scratch_buffer<K> k0, k1;
    scratch_buffer<P> p0, p1;
    scratch_buffer<std::uint32_t> h;
    K* keys = nullptr;             // fill keys[0, n) and payload[0, n) after prepare(n)
    P* payload = nullptr;          // ... and read them here after sort(n)
    std::uint32_t* hist = nullptr; // zeroed by prepare(); count each key with layout::count

    radix_buffers() = default;
    radix_buffers(const radix_buffers&) noexcept {} // scratch: a copy starts empty
    radix_buffers& operator=(const radix_buffers&) noexcept {
        keys = nullptr;
        payload = nullptr;
        hist = nullptr;
        return *this;
    }
    radix_buffers(radix_buffers&&) noexcept = default;
    radix_buffers& operator=(radix_buffers&&) noexcept = default;

    void prepare(std::size_t n) {
        keys = k0.get(n);
        payload = p0.get(n);
        hist = h.get(layout::histogram_size);
        std::fill(hist, hist + layout::histogram_size, 0u);
    }
    /// Sorts; the histograms must have been counted over keys[0, n) during the fill.
    void sort(std::size_t n) {
        K* kt = k1.get(n);
        P* pt = p1.get(n);
        if (radix_sort<Bits>(keys, kt, payload, pt, n, hist, true)) {
            keys = kt;
            payload = pt;
        }
    }
};

/// Keys of a payload-free sort on their low KeyBits bits, with scratch: sort() leaves the
/// result in keys.
template <class K, int KeyBits>
struct radix_key_buffers {
    using layout = radix_layout<K, radix_digit_bits<K>, KeyBits>;
    scratch_buffer<K> k0, k1;
    scratch_buffer<std::uint32_t> h;
    K* keys = nullptr;             // fill keys[0, n) after prepare(n), read them after sort(n)
    std::uint32_t* hist = nullptr; // zeroed by prepare(); count each key with layout::count

    radix_key_buffers() = default;
    radix_key_buffers(const radix_key_buffers&) noexcept {}
    radix_key_buffers& operator=(const radix_key_buffers&) noexcept {
        keys = nullptr;
        hist = nullptr;
        return *this;
    }
    radix_key_buffers(radix_key_buffers&&) noexcept = default;
    radix_key_buffers& operator=(radix_key_buffers&&) noexcept = default;

    void prepare(std::size_t n) {
        keys = k0.get(n);
        hist = h.get(layout::histogram_size);
        std::fill(hist, hist + layout::histogram_size, 0u);
    }
    void sort(std::size_t n) {
        K* t = k1.get(n);
        if (radix_sort_keys<KeyBits>(keys, t, n, hist, true))
            keys = t;
    }
};

} // namespace detail
HELDOUT_NAMESPACE_END
