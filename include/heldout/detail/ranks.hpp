// heldout/detail/ranks.hpp — validated key building, exact tie groups and rank sums over
// radix-sorted scores: the shared core of AUC, DeLong, curves, AP and partial AUC.
// Internal: include the public headers instead.
//
// Exactness: tie groups are runs of equal keys (exact equality of the scores, -0 == +0).
// Unweighted rank sums use doubled midranks in 64-bit integers: the doubled midrank of
// sorted positions start+1..start+size is 2 start + size + 1, and the doubled Mann–Whitney
// U is sum over groups of p_g (2 N_below + q_g) (p_g, q_g the positives and negatives of
// group g, N_below the negatives of lower groups); it is at most 2 m n < 2^63 for
// n < 2^32 rows, so it never leaves the integers (doubles lose digits past 2^53).
// Weighted sums use Neumaier-compensated doubles.
#pragma once

#include <heldout/detail/isa.hpp>
#include <heldout/detail/radix_sort.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <array>
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

#if defined(__SSE2__) && defined(__x86_64__)
#include <emmintrin.h>
#endif

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Payload packing of a row index and its 0/1 label: row | label << 31 (rows < 2^31).
inline constexpr std::uint32_t label_bit = 0x80000000u;
inline constexpr std::size_t max_packed_rows = 0x7fffffffu;

/// Scores must be float or double: their bit patterns are the sort keys.
template <class T>
inline constexpr bool rankable_score_v = std::is_same_v<T, float> || std::is_same_v<T, double>;

/// 0/1 test of one label of any integral type (bool included).
template <class L>
constexpr bool is_binary_label(L l) noexcept {
    if constexpr (std::is_same_v<L, bool>)
        return true;
    else
        return static_cast<std::make_unsigned_t<L>>(l) <= 1u;
}

/// The unsigned type of a label's bits (bool: unsigned char).
template <class L>
struct label_word {
    using type = std::make_unsigned_t<L>;
};
template <>
struct label_word<bool> {
    using type = unsigned char;
};

/// Checks sizes (truth, scores, and the packing limit) for a sort of n rows.
inline void check_rank_sizes(std::string_view who, std::size_t n_truth, std::size_t n_scores, std::size_t limit,
                             std::string_view scores_arg = "scores") {
    check_nonempty(who, "truth", n_truth);
    check_same_size(who, scores_arg, n_truth, n_scores);
    if (n_truth > limit)
        fail(who, "truth",
             "size " + std::to_string(n_truth) + " exceeds the limit of " + std::to_string(limit) + " rows");
}

/// One validating pass over the rows: store(i, order_key(s[i]), label_i) (label 0 or 1) for
/// each row, where the caller writes its sort keys and payloads and counts the radix
/// histograms; finite scores and 0/1 labels are checked on the side, and on failure the
/// first offending index is reported. Returns the number of positives.
template <class T, class L, class Store>
std::size_t fill_keys(std::string_view who, std::span<const T> s, std::span<const L> y, Store store,
                      std::string_view scores_arg = "scores") {
    static_assert(rankable_score_v<T>, "heldout: ranking measures take float or double scores");
    const std::size_t n = s.size();
    bool bad = false;
    std::size_t positives = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const T x = s[i];
        const L l = y[i];
        bad |= !(std::abs(x) <= std::numeric_limits<T>::max()); // NaN and +-inf
        bad |= !is_binary_label(l);
        positives += l != L(0);
        store(i, order_key(x), static_cast<std::uint32_t>(l != L(0)));
    }
    if (bad) {
        check_binary(who, "truth", y);
        check_finite(who, scores_arg, s);
    }
    return positives;
}

/// Doubled U, positives and negatives from keys sorted ascending with 0/1 labels.
struct rank_sum_counts {
    std::uint64_t doubled_u = 0;
    std::uint64_t positives = 0;
    std::uint64_t negatives = 0;
};

/// Doubled U from sorted packed keys (score key << 1 | label, see exact_auc), where within a
/// tie group the negatives come first (the label is the lowest key bit). For a positive at
/// sorted position i, the negatives before it are exactly those with a score <= its own, and
/// the negatives before its tie group those with a smaller score, so
///   2U = #(neg < pos) + #(neg <= pos) = sum_pos N_group_start + sum_pos (i - rank among positives)
///      = sum_pos N_group_start + sum_pos i - m (m - 1) / 2.
/// Per row: one select (the negatives at the group start) and three adds.
inline rank_sum_counts doubled_mann_whitney_packed(const std::uint64_t* packed, std::size_t n) noexcept {
    std::uint64_t below = 0, at = 0, neg = 0, neg_start = 0;
    std::uint64_t prev = n ? packed[0] >> 1 : 0;
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint64_t v = packed[i];
        const std::uint64_t k = v >> 1;
        // g++ makes this a branch; measured at 1e7 rows it beat masks (and/or) at every tie
        // rate tried (0 %, 7 %, 90 %, 100 % of rows tied to their predecessor) but 42 %.
        neg_start = k != prev ? neg : neg_start;
        prev = k;
        const std::uint64_t is_pos = 0 - (v & 1u);
        below += neg_start & is_pos;
        at += i & is_pos;
        neg += (v & 1u) ^ 1u;
    }
    const std::uint64_t pos = n - neg;
    return {below + at - pos * (pos - (pos > 0)) / 2, pos, neg};
}

/// A tie group of the sorted scores: its score and the positive / negative weight in it.
struct tie_group {
    double score = 0;
    double positive = 0;
    double negative = 0;
};

/// How a double's 64-bit order key is split into a 32-bit radix key and a rest of at most 32
/// bits, fitted to the data (see sorted_rows<double>). The top 12 key bits t (sign and
/// exponent) are replaced by their rank code among the values t can take here — the range of t
/// over the negative scores, zero, the range over the positive scores — so the code needs
/// code_bits = bit_width(codes - 1) bits and the radix key keeps the 32 - code_bits leading
/// mantissa bits below it; the other mantissa bits are the rest. The map is strictly
/// increasing, so (key, rest) orders like the scores and is equal exactly for equal scores.
/// Why: the plain high half spends 12 bits on sign and exponent, of which scores in [0, 1) use
/// about 25 values; at 1e7 such rows, two thirds shared their high half with a neighbour and
/// ordering those runs cost 79 of 330 ms. With the codes (5 bits there) 1.4 % share it.
struct double_split {
    std::array<std::uint16_t, 4096> code_of{}; // t -> code (set for the occurring ranges only)
    std::array<std::uint16_t, 4096> t_of{};    // code -> t
    int mantissa_bits = 32;                    // leading mantissa bits in the radix key (20..32)

    static constexpr std::uint64_t mantissa_mask = (std::uint64_t{1} << 52) - 1;

    std::uint32_t key(std::uint64_t k) const noexcept {
        const std::uint64_t code = code_of[static_cast<std::size_t>(k >> 52)];
        return static_cast<std::uint32_t>((code << mantissa_bits) | ((k & mantissa_mask) >> (52 - mantissa_bits)));
    }
    std::uint64_t rest(std::uint64_t k) const noexcept { return k & ((std::uint64_t{1} << (52 - mantissa_bits)) - 1); }
    /// The order key back from its radix key and rest.
    std::uint64_t order_key_of(std::uint32_t key, std::uint64_t rest) const noexcept {
        const std::uint64_t h = key;
        const std::uint64_t t = t_of[static_cast<std::size_t>(h >> mantissa_bits)];
        return (t << 52) | ((h & ((std::uint64_t{1} << mantissa_bits) - 1)) << (52 - mantissa_bits)) | rest;
    }

    /// Codes for the fields that occur: t in [neg_low, neg_high] (negative normal scores; an
    /// empty range when neg_low > neg_high), 0x7ff and 0x800 if `small` (zeros and subnormals:
    /// exponent field 0), t in [pos_low, pos_high] (positive normal scores). The three sets are
    /// disjoint and in this order (negative normals have t <= 0x7fe, positive ones t >= 0x801).
    void fit(int neg_low, int neg_high, bool small, int pos_low, int pos_high) noexcept {
        std::size_t codes = 0;
        const auto span_of = [&](int from, int to) {
            for (int t = from; t <= to; ++t) {
                code_of[static_cast<std::size_t>(t)] = static_cast<std::uint16_t>(codes);
                t_of[codes++] = static_cast<std::uint16_t>(t);
            }
        };
        span_of(neg_low, neg_high);
        if (small)
            span_of(0x7ff, 0x800);
        span_of(pos_low, pos_high);
        mantissa_bits = 32 - static_cast<int>(std::bit_width(codes - 1));
    }
};

/// Ranges of the sign-and-exponent field t of the order keys over the negative and the
/// positive normal scores, whether exponent field 0 (zeros, subnormals) or 0x7ff (infinities,
/// NaN) occurs; from the top 16 bits h of each double's bit pattern.
struct field_ranges {
    int neg_low = 0x7fff, neg_high = -1, pos_low = 0x7fff, pos_high = -1;
    bool small = false, non_finite = false;

    void add(std::uint32_t h) noexcept {
        const std::uint32_t e = h & 0x7ff0u;
        const bool neg = (h >> 15) != 0;
        const int t = static_cast<int>((h ^ (neg ? 0xffffu : 0x8000u)) >> 4);
        non_finite |= e == 0x7ff0u;
        if (e == 0) {
            small = true;
        } else if (neg) {
            neg_low = std::min(neg_low, t);
            neg_high = std::max(neg_high, t);
        } else {
            pos_low = std::min(pos_low, t);
            pos_high = std::max(pos_high, t);
        }
    }
    void add_doubles(const double* s, std::size_t n) noexcept;
};

/// The ranges of n scores (see field_ranges). With SSE2, 8 rows at a time on 16-bit lanes
/// (the compiler vectorises no min/max of doubles without -ffast-math: the scalar pass cost
/// 24 ms at 1e7 rows).
inline void field_ranges::add_doubles(const double* s, std::size_t n) noexcept {
    std::size_t i = 0;
#if defined(__SSE2__) && defined(__x86_64__)
    const __m128i ones = _mm_set1_epi16(-1), empty_low = _mm_set1_epi16(0x7fff);
    const __m128i exp_mask = _mm_set1_epi16(0x7ff0), sign = _mm_set1_epi16(static_cast<short>(0x8000));
    __m128i nlo = empty_low, nhi = ones, plo = empty_low, phi = ones, sm = _mm_setzero_si128(), bad = sm;
    for (; i + 8 <= n; i += 8) {
        const auto top = [&](std::size_t k) {
            return _mm_srli_epi64(_mm_loadu_si128(reinterpret_cast<const __m128i*>(s + i + k)), 48);
        };
        const __m128i h = _mm_or_si128(_mm_or_si128(top(0), _mm_slli_epi64(top(2), 16)),
                                       _mm_or_si128(_mm_slli_epi64(top(4), 32), _mm_slli_epi64(top(6), 48)));
        const __m128i e = _mm_and_si128(h, exp_mask);
        const __m128i tiny = _mm_cmpeq_epi16(e, _mm_setzero_si128()); // zero or subnormal
        bad = _mm_or_si128(bad, _mm_cmpeq_epi16(e, exp_mask));
        sm = _mm_or_si128(sm, tiny);
        const __m128i neg = _mm_srai_epi16(h, 15);
        const __m128i t = _mm_srli_epi16(_mm_xor_si128(h, _mm_or_si128(neg, sign)), 4);
        const __m128i nm = _mm_andnot_si128(tiny, neg);
        const __m128i pm = _mm_andnot_si128(_mm_or_si128(tiny, neg), ones);
        const __m128i nt = _mm_and_si128(nm, t), pt = _mm_and_si128(pm, t);
        nlo = _mm_min_epi16(nlo, _mm_or_si128(nt, _mm_andnot_si128(nm, empty_low)));
        nhi = _mm_max_epi16(nhi, _mm_or_si128(nt, _mm_andnot_si128(nm, ones)));
        plo = _mm_min_epi16(plo, _mm_or_si128(pt, _mm_andnot_si128(pm, empty_low)));
        phi = _mm_max_epi16(phi, _mm_or_si128(pt, _mm_andnot_si128(pm, ones)));
    }
    alignas(16) std::int16_t v[6][8];
    _mm_store_si128(reinterpret_cast<__m128i*>(v[0]), nlo);
    _mm_store_si128(reinterpret_cast<__m128i*>(v[1]), nhi);
    _mm_store_si128(reinterpret_cast<__m128i*>(v[2]), plo);
    _mm_store_si128(reinterpret_cast<__m128i*>(v[3]), phi);
    _mm_store_si128(reinterpret_cast<__m128i*>(v[4]), sm);
    _mm_store_si128(reinterpret_cast<__m128i*>(v[5]), bad);
    for (int k = 0; k < 8; ++k) {
        neg_low = std::min(neg_low, static_cast<int>(v[0][k]));
        neg_high = std::max(neg_high, static_cast<int>(v[1][k]));
        pos_low = std::min(pos_low, static_cast<int>(v[2][k]));
        pos_high = std::max(pos_high, static_cast<int>(v[3][k]));
        small |= v[4][k] != 0;
        non_finite |= v[5][k] != 0;
    }
#endif
    for (; i < n; ++i)
        add(static_cast<std::uint32_t>(std::bit_cast<std::uint64_t>(s[i]) >> 48));
}

/// Rows sorted by score, ascending, with exact tie groups, as produced by sort_rows: at(i) is
/// the 32-bit tag of rank i (row | label << 31 unless the caller chose other tags), same(i)
/// tells whether rank i has the score of rank i - 1 (i >= 1), score(i) is that score;
/// positives counts label 1. The order within a tie group is unspecified.
/// Float scores: 32-bit keys with the tag carried (3 radix passes of 8 bytes).
/// Double scores: the 32-bit radix key holds the leading bits of the score (see double_split)
/// and the payload (rest << 32 | tag) the others; the rows are radix-sorted on the key (4
/// passes of 8-bit digits: for this 12-byte row measured 15-20 % faster than 3 of 11 bits, at
/// 1e5 to 1e7 rows), then each run of equal keys is ordered by its payloads (insertion sort, or
/// std::sort past 32 rows, unless the run's rests are all equal). That is 4 passes of 12
/// bytes instead of 5 or 6 of 16 on 64-bit keys. When no score has rest bits (floats widened
/// to double, say) the runs are exact ties and are left as they are. Adversarial data (many
/// distinct doubles sharing their leading 32 bits) falls back to std::sort per run.
template <class T>
struct sorted_rows;

template <>
struct sorted_rows<float> {
    const std::uint32_t* key = nullptr;
    const std::uint32_t* rowlab = nullptr;
    std::size_t n = 0;
    std::size_t positives = 0;
    bool same(std::size_t i) const noexcept { return key[i] == key[i - 1]; }
    std::uint32_t at(std::size_t i) const noexcept { return rowlab[i]; }
    double score(std::size_t i) const noexcept { return static_cast<double>(key_score(key[i])); }
    /// Prefetch hint for the 16 ranks from i (i + 16 <= n).
    void prefetch(std::size_t i) const noexcept {
        prefetch_hint(key + i);
        prefetch_hint(rowlab + i);
    }
};

template <>
struct sorted_rows<double> {
    const std::uint32_t* hi = nullptr;
    const std::uint64_t* pay = nullptr;
    std::size_t n = 0;
    std::size_t positives = 0;
    const double_split* split = nullptr;
    bool same(std::size_t i) const noexcept { return hi[i] == hi[i - 1] && (pay[i] >> 32) == (pay[i - 1] >> 32); }
    std::uint32_t at(std::size_t i) const noexcept { return static_cast<std::uint32_t>(pay[i]); }
    double score(std::size_t i) const noexcept { return key_score(split->order_key_of(hi[i], pay[i] >> 32)); }
    void prefetch(std::size_t i) const noexcept {
        prefetch_hint(hi + i);
        prefetch_hint(pay + i);
        prefetch_hint(pay + i + 8);
    }
};

/// Ranks ahead of a sequential pass over sorted rows that it asks the memory system for, every
/// 16 ranks. Why: on this kind of VM the hardware prefetcher left such passes waiting (the
/// Mann-Whitney scan of 1e7 double rows: 35 -> 15 ms).
inline constexpr std::size_t scan_prefetch = 64;

/// The prefetch step of a pass at rank i over sorted rows.
template <class R>
HELDOUT_DETAIL_INLINE void prefetch_ahead(const R& r, std::size_t i) noexcept {
    if ((i & 15) == 0 && i + scan_prefetch + 16 <= r.n)
        r.prefetch(i + scan_prefetch);
}

/// Orders each run of equal keys by its payloads (see sorted_rows<double>).
inline void refine_runs(const std::uint32_t* hi, std::uint64_t* pay, std::size_t n) {
    const sorted_rows<double> ahead{hi, pay, n}; // for its prefetch hints: runs are everywhere
    std::size_t i = 0;
    while (i < n) {
        prefetch_ahead(ahead, i);
        if (i + 1 == n || hi[i + 1] != hi[i]) { // the common case, continuous scores
            ++i;
            continue;
        }
        std::size_t j = i + 2;
        while (j < n && hi[j] == hi[i])
            ++j;
        if (j - i > 32) {
            const std::uint64_t rest = pay[i] >> 32;
            if (std::any_of(pay + i + 1, pay + j, [rest](std::uint64_t p) { return p >> 32 != rest; }))
                std::sort(pay + i, pay + j);
        } else {
            for (std::size_t t = i + 1; t < j; ++t) {
                const std::uint64_t v = pay[t];
                std::size_t u = t;
                for (; u > i && pay[u - 1] > v; --u)
                    pay[u] = pay[u - 1];
                pay[u] = v;
            }
        }
        i = j;
    }
}

/// Tie groups (ascending score) of sorted rows; weights indexed by original row, or none.
/// Weighted, the group sums are of the weights times `scale` (a power of two, see
/// collect_groups); returns false when the total weight overflowed.
template <class T, class W>
bool collect_groups_scaled(const sorted_rows<T>& r, const W* weights, double scale, std::vector<tie_group>& out) {
    out.clear();
    std::size_t i = 0;
    const std::size_t n = r.n;
    double total = 0; // of the weighted group sums: overflow shows as +inf
    while (i < n) {
        const std::size_t first = i;
        compensated_sum p, q;
        double up = 0, uq = 0; // unit-weight counts, exact
        do {
            const std::uint32_t v = r.at(i);
            if (weights) {
                const double w = static_cast<double>(weights[v & ~label_bit]) * scale;
                (v & label_bit) ? p.add(w) : q.add(w);
            } else {
                (v & label_bit) ? ++up : ++uq;
            }
            ++i;
        } while (i < n && r.same(i));
        if (weights) {
            out.push_back({r.score(first), p.value(), q.value()});
            total += out.back().positive + out.back().negative;
        } else {
            out.push_back({r.score(first), up, uq});
        }
    }
    return total <= std::numeric_limits<double>::max();
}

/// Tie groups (ascending score) of sorted rows; weights indexed by original row, or none.
/// Every consumer uses ratios of the group sums, so their scale is free: when a weighted
/// group sum overflows (total weight beyond about 1.8e308), the sums are taken again of the
/// weights scaled by a power of two that brings the largest to [1, 2) (exact).
template <class T, class W>
void collect_groups(const sorted_rows<T>& r, const W* weights, std::vector<tie_group>& out) {
    if (collect_groups_scaled(r, weights, 1.0, out) || !weights)
        return;
    double top = 0;
    for (std::size_t i = 0; i < r.n; ++i)
        top = std::max(top, static_cast<double>(weights[i]));
    collect_groups_scaled(r, weights, unit_scale(top), out);
}

/// Weighted Mann–Whitney sums from ascending tie groups: U = sum_g P_g (N_below + N_g / 2).
/// u is of the group sums times `scale` (u scale^2 in the original units), so that it neither
/// overflows nor underflows whatever the scale of the weights; positive and negative are the
/// class totals in the groups' units.
struct weighted_rank_sum {
    double u = 0;
    double positive = 0;
    double negative = 0;
    double scale = 1;
    /// U / (P N): the weighted AUC, with every product formed in the scaled units.
    double auc() const noexcept { return u / (positive * scale) / (negative * scale); }
};

inline weighted_rank_sum mann_whitney_of_groups(std::span<const tie_group> g) noexcept {
    double top = 0;
    for (const auto& t : g)
        top = std::max(top, std::max(t.positive, t.negative));
    const double s = unit_scale(top);
    compensated_sum u, below, pos;
    for (const auto& t : g) {
        const double p = t.positive * s, q = t.negative * s;
        u.add(p * (below.value() + 0.5 * q));
        below.add(q);
        pos.add(p);
    }
    return {u.value(), pos.value() / s, below.value() / s, s};
}

/// Throws undefined_error when a class has no observations (or, weighted, no weight),
/// naming the missing class.
inline void check_both_classes(std::string_view who, double positive, double negative, bool weighted) {
    const char* tail =
        weighted ? " is absent or has zero total weight; it needs both classes" : " is absent; it needs both classes";
    if (!(positive > 0))
        fail_undefined(who, std::string("class 1 (positives)") + tail);
    if (!(negative > 0))
        fail_undefined(who, std::string("class 0 (negatives)") + tail);
}

/// Scratch for every sort the ranking measures make (never state: copies start empty).
struct rank_scratch {
    radix_key_buffers<std::uint64_t, 33> packed33;        // float AUC: score key << 1 | label
    radix_buffers<std::uint32_t, std::uint32_t> row32;    // float: key, tag
    radix_buffers<std::uint32_t, std::uint64_t, 8> split; // double: radix key, rest << 32 | tag
    double_split fit;                                     // double: how the keys were split
    std::vector<tie_group> groups;
    scratch_buffer<double> values;        // per-row values (DeLong structural components)
    scratch_buffer<std::uint32_t> counts; // per-row doubled counts (the two-model DeLong walk)

    rank_scratch() = default;
    rank_scratch(const rank_scratch&) noexcept {}
    rank_scratch& operator=(const rank_scratch&) noexcept { return *this; }
    rank_scratch(rank_scratch&&) noexcept = default;
    rank_scratch& operator=(rank_scratch&&) noexcept = default;
};

/// The default tags of sorted rows: row | label << 31.
struct row_tag {
    std::uint32_t operator()(std::size_t i, std::uint32_t label) const noexcept {
        return static_cast<std::uint32_t>(i) | (label << 31);
    }
};

/// The validating pass of double scores ahead of their split: finite scores and 0/1 labels
/// (the first offending index reported), the positives counted, the split fitted to the
/// field ranges of the scores. Returns the number of positives.
template <class L>
std::size_t profile_doubles(std::string_view who, std::span<const double> s, std::span<const L> y, double_split& fit,
                            std::string_view scores_arg) {
    const std::size_t n = s.size();
    using U = typename label_word<L>::type;
    field_ranges r;
    U bad_label = 0;
    std::size_t positives = 0;
    // Blocks of 1024 rows with a prefetch hint for each cache line of scores two blocks ahead.
    constexpr std::size_t block = 1024;
    for (std::size_t start = 0; start < n; start += block) {
        const std::size_t end = std::min(n, start + block);
        if (end + block <= n)
            prefetch_rows(s.data(), end, end + block);
        r.add_doubles(s.data() + start, end - start);
        std::uint32_t block_positives = 0; // a narrow count: the loop vectorises
        for (std::size_t i = start; i < end; ++i) {
            const U u = static_cast<U>(y[i]);
            bad_label |= u & static_cast<U>(~U(1));
            block_positives += static_cast<std::uint32_t>(u & 1u);
        }
        positives += block_positives;
    }
    if (bad_label != 0)
        check_binary(who, "truth", y);
    if (r.non_finite)
        check_finite(who, scores_arg, s);
    fit.fit(r.neg_low, r.neg_high, r.small, r.pos_low, r.pos_high);
    return positives;
}

/// Validates (finite scores, 0/1 labels) and sorts the rows by score (see sorted_rows); the
/// tag of row i with label l is tag(i, l).
template <class T, class L, class Tag = row_tag>
sorted_rows<T> sort_rows(std::string_view who, std::span<const T> s, std::span<const L> y, rank_scratch& sc,
                         std::string_view scores_arg = "scores", Tag tag = {}) {
    const std::size_t n = y.size();
    check_rank_sizes(who, n, s.size(), max_packed_rows, scores_arg);
    if constexpr (sizeof(T) == 4) {
        auto& buf = sc.row32;
        buf.prepare(n);
        const std::size_t positives = fill_keys(
            who, s, y,
            [&tag, key = buf.keys, payload = buf.payload, hist = buf.hist](std::size_t i, std::uint32_t k,
                                                                           std::uint32_t l) {
                key[i] = k;
                radix_layout<std::uint32_t>::count(hist, k);
                payload[i] = tag(i, l);
            },
            scores_arg);
        buf.sort(n);
        return {buf.keys, buf.payload, n, positives};
    } else {
        auto& buf = sc.split;
        const double_split& fit = sc.fit;
        const std::size_t positives = profile_doubles(who, s, y, sc.fit, scores_arg);
        buf.prepare(n);
        std::uint64_t rests = 0;
        std::uint32_t* const key = buf.keys;
        std::uint64_t* const payload = buf.payload;
        std::uint32_t* const hist = buf.hist;
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint64_t k = order_key(s[i]);
            const std::uint32_t h = fit.key(k);
            const std::uint64_t r = fit.rest(k);
            key[i] = h;
            std::remove_reference_t<decltype(buf)>::layout::count(hist, h);
            payload[i] = (r << 32) | tag(i, static_cast<std::uint32_t>(y[i] != L(0)));
            rests |= r;
        }
        buf.sort(n);
        if (rests != 0) // else equal keys are equal scores
            refine_runs(buf.keys, buf.payload, n);
        return {buf.keys, buf.payload, n, positives, &fit};
    }
}

/// Doubled U and class counts of sorted rows (the scan of doubled_mann_whitney).
template <class T>
rank_sum_counts doubled_mann_whitney(const sorted_rows<T>& r) noexcept {
    std::uint64_t a = 0, b = 0, pos = 0, neg = 0, neg_start = 0, pos_start = 0;
    for (std::size_t i = 0; i < r.n; ++i) {
        prefetch_ahead(r, i);
        const std::uint64_t start = 0 - static_cast<std::uint64_t>(i == 0 || !r.same(i));
        neg_start = (neg & start) | (neg_start & ~start);
        pos_start = (pos & start) | (pos_start & ~start);
        const std::uint64_t l = r.at(i) >> 31;
        const std::uint64_t is_pos = 0 - l;
        a += neg_start & is_pos;
        b += pos_start & ~is_pos;
        pos += l;
        neg += 1 - l;
    }
    return {a + pos * neg - b, pos, neg};
}

/// Sorts the rows by score and returns their tie groups (ascending) in sc.groups: validation
/// of truth, scores and (optional) weights included.
template <class T, class L, class W>
const std::vector<tie_group>& ranked_groups(std::string_view who, std::span<const T> s, std::span<const L> y,
                                            std::span<const W> w, rank_scratch& sc,
                                            std::string_view scores_arg = "scores") {
    const auto r = sort_rows(who, s, y, sc, scores_arg); // truth and scores first, as in add()
    if (!w.empty()) {
        check_same_size(who, "weights", y.size(), w.size());
        check_weights(who, w);
    }
    collect_groups(r, w.empty() ? static_cast<const W*>(nullptr) : w.data(), sc.groups);
    return sc.groups;
}

/// The sort scratch of the calling thread, shared by every ranking measure and function: after
/// the first evaluation of a given size nothing is allocated again (fresh accumulators
/// included), and value() on one object from several threads does not race. It keeps the
/// largest buffers seen until the thread ends.
inline rank_scratch& thread_scratch() {
    thread_local rank_scratch s;
    return s;
}

/// Exact unweighted AUC (Mann–Whitney U / (m n), ties one half), validating the inputs.
/// Float scores: one 64-bit key per row, the 32-bit score key shifted left once with the label
/// below it, sorted on its 33 bits (3 radix passes of 8 bytes; within a tie group negatives
/// come first, which the scan does not care about). Double scores: sort_rows (split keys, see
/// sorted_rows<double>).
template <class T, class L>
double exact_auc(std::string_view who, std::span<const T> s, std::span<const L> y, rank_scratch& scratch,
                 std::string_view scores_arg = "scores") {
    static_assert(rankable_score_v<T>, "heldout: ranking measures take float or double scores");
    const std::size_t n = y.size();
    check_rank_sizes(who, n, s.size(), std::numeric_limits<std::uint32_t>::max(), scores_arg);
    rank_sum_counts r;
    if constexpr (sizeof(T) == 4) {
        auto& buf = scratch.packed33;
        using layout = std::remove_reference_t<decltype(buf)>::layout;
        buf.prepare(n);
        fill_keys(
            who, s, y,
            [key = buf.keys, hist = buf.hist](std::size_t i, std::uint32_t k, std::uint32_t l) {
                const std::uint64_t v = (static_cast<std::uint64_t>(k) << 1) | l;
                key[i] = v;
                layout::count(hist, v);
            },
            scores_arg);
        buf.sort(n);
        r = doubled_mann_whitney_packed(buf.keys, n);
    } else {
        r = doubled_mann_whitney(sort_rows(who, s, y, scratch, scores_arg));
    }
    check_both_classes(who, static_cast<double>(r.positives), static_cast<double>(r.negatives), false);
    // 2U and 2mn are exact integers below 2^64; long double holds them exactly on x86.
    const long double mn2 = 2.0L * static_cast<long double>(r.positives) * static_cast<long double>(r.negatives);
    return static_cast<double>(static_cast<long double>(r.doubled_u) / mn2);
}

/// Exact weighted AUC: sum over pairs w_i w_j psi / (W+ W-).
template <class T, class L, class W>
double exact_weighted_auc(std::string_view who, std::span<const T> s, std::span<const L> y, std::span<const W> w,
                          rank_scratch& scratch, std::string_view scores_arg = "scores") {
    const weighted_rank_sum r = mann_whitney_of_groups(ranked_groups(who, s, y, w, scratch, scores_arg));
    check_both_classes(who, r.positive, r.negative, true);
    return r.auc();
}

} // namespace detail
HELDOUT_NAMESPACE_END
