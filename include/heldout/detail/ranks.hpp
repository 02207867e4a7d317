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

#include <heldout/detail/radix_sort.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Payload packing of a row index and its 0/1 label: row | label << 31 (rows < 2^31).
inline constexpr std::uint32_t label_bit = 0x80000000u;
inline constexpr std::size_t max_packed_rows = 0x7fffffffu;

/// Doubled midrank of sorted positions start+1 .. start+size (1-based ranks), exact.
constexpr std::uint64_t doubled_midrank(std::uint64_t start, std::uint64_t size) noexcept {
    return 2 * start + size + 1;
}

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
/// first offending index is reported.
template <class T, class L, class Store>
void fill_keys(std::string_view who, std::span<const T> s, std::span<const L> y, Store store,
               std::string_view scores_arg = "scores") {
    static_assert(rankable_score_v<T>, "heldout: ranking measures take float or double scores");
    const std::size_t n = s.size();
    bool bad = false;
    for (std::size_t i = 0; i < n; ++i) {
        const T x = s[i];
        const L l = y[i];
        bad |= !(std::abs(x) <= std::numeric_limits<T>::max()); // NaN and +-inf
        bad |= !is_binary_label(l);
        store(i, order_key(x), static_cast<std::uint32_t>(l != L(0)));
    }
    if (bad) {
        check_binary(who, "truth", y);
        check_finite(who, scores_arg, s);
    }
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

/// Rows sorted by score, ascending and stably, with exact tie groups, as produced by
/// sort_rows: at(i) is the packed row | label << 31 of rank i, same(i) tells whether rank i
/// has the score of rank i - 1 (i >= 1), score(i) is that score.
/// Float scores: 32-bit keys with the packed row carried (3 radix passes of 8 bytes).
/// Double scores: the 64-bit key is split; rows are radix-sorted by its high 32 bits (3 passes)
/// carrying (low 32 bits << 32 | row | label << 31), then each run of equal high halves (short
/// for continuous data) is ordered by the payload, i.e. by the low half (insertion sort, or
/// std::sort past 32 rows). That is 3 passes of 12 bytes instead of 5 (one skipped of 6) on
/// 64-bit keys: measured AUC / std::sort of the doubles at 1e7 went from about 0.95 to 0.47.
/// Adversarial data (many doubles sharing their high 32 bits) falls back to std::sort per run.
template <class T>
struct sorted_rows;

template <>
struct sorted_rows<float> {
    const std::uint32_t* key = nullptr;
    const std::uint32_t* rowlab = nullptr;
    std::size_t n = 0;
    bool same(std::size_t i) const noexcept { return key[i] == key[i - 1]; }
    std::uint32_t at(std::size_t i) const noexcept { return rowlab[i]; }
    double score(std::size_t i) const noexcept { return static_cast<double>(key_score(key[i])); }
};

template <>
struct sorted_rows<double> {
    const std::uint32_t* hi = nullptr;
    const std::uint64_t* pay = nullptr;
    std::size_t n = 0;
    bool same(std::size_t i) const noexcept { return hi[i] == hi[i - 1] && (pay[i] >> 32) == (pay[i - 1] >> 32); }
    std::uint32_t at(std::size_t i) const noexcept { return static_cast<std::uint32_t>(pay[i]); }
    double score(std::size_t i) const noexcept {
        return key_score((static_cast<std::uint64_t>(hi[i]) << 32) | (pay[i] >> 32));
    }
};

/// Orders each run of equal high halves by its payloads (see sorted_rows<double>).
inline void refine_runs(const std::uint32_t* hi, std::uint64_t* pay, std::size_t n) {
    std::size_t i = 0;
    while (i < n) {
        std::size_t j = i + 1;
        while (j < n && hi[j] == hi[i])
            ++j;
        if (j - i > 32) {
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
template <class T, class W>
void collect_groups(const sorted_rows<T>& r, const W* weights, std::vector<tie_group>& out) {
    out.clear();
    std::size_t i = 0;
    const std::size_t n = r.n;
    while (i < n) {
        const std::size_t first = i;
        compensated_sum p, q;
        double up = 0, uq = 0; // unit-weight counts, exact
        do {
            const std::uint32_t v = r.at(i);
            if (weights) {
                const double w = static_cast<double>(weights[v & ~label_bit]);
                (v & label_bit) ? p.add(w) : q.add(w);
            } else {
                (v & label_bit) ? ++up : ++uq;
            }
            ++i;
        } while (i < n && r.same(i));
        if (weights)
            out.push_back({r.score(first), p.value(), q.value()});
        else
            out.push_back({r.score(first), up, uq});
    }
}

/// Weighted Mann–Whitney sums from ascending tie groups: U = sum_g P_g (N_below + N_g / 2).
struct weighted_rank_sum {
    double u = 0;
    double positive = 0;
    double negative = 0;
};

inline weighted_rank_sum mann_whitney_of_groups(std::span<const tie_group> g) noexcept {
    compensated_sum u, below, pos;
    for (const auto& t : g) {
        u.add(t.positive * (below.value() + 0.5 * t.negative));
        below.add(t.negative);
        pos.add(t.positive);
    }
    return {u.value(), pos.value(), below.value()};
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
    radix_key_buffers<std::uint64_t, 33> packed33;     // float AUC: score key << 1 | label
    radix_buffers<std::uint32_t, std::uint32_t> row32; // float: key, row | label
    radix_buffers<std::uint32_t, std::uint64_t> split; // double: key high half, (low half, row | label)
    std::vector<tie_group> groups;
    scratch_buffer<double> values; // per-row values (DeLong structural components)

    rank_scratch() = default;
    rank_scratch(const rank_scratch&) noexcept {}
    rank_scratch& operator=(const rank_scratch&) noexcept { return *this; }
    rank_scratch(rank_scratch&&) noexcept = default;
    rank_scratch& operator=(rank_scratch&&) noexcept = default;
};

/// Validates (finite scores, 0/1 labels) and sorts the rows by score (see sorted_rows).
template <class T, class L>
sorted_rows<T> sort_rows(std::string_view who, std::span<const T> s, std::span<const L> y, rank_scratch& sc,
                         std::string_view scores_arg = "scores") {
    const std::size_t n = y.size();
    check_rank_sizes(who, n, s.size(), max_packed_rows, scores_arg);
    const auto pack = [](std::size_t i, std::uint32_t l) { return static_cast<std::uint32_t>(i) | (l << 31); };
    if constexpr (sizeof(T) == 4) {
        auto& buf = sc.row32;
        buf.prepare(n);
        fill_keys(
            who, s, y,
            [pack, key = buf.keys, payload = buf.payload, hist = buf.hist](std::size_t i, std::uint32_t k,
                                                                           std::uint32_t l) {
                key[i] = k;
                radix_layout<std::uint32_t>::count(hist, k);
                payload[i] = pack(i, l);
            },
            scores_arg);
        buf.sort(n);
        return {buf.keys, buf.payload, n};
    } else {
        auto& buf = sc.split;
        buf.prepare(n);
        fill_keys(
            who, s, y,
            [pack, key = buf.keys, payload = buf.payload, hist = buf.hist](std::size_t i, std::uint64_t k,
                                                                           std::uint32_t l) {
                const auto hi = static_cast<std::uint32_t>(k >> 32);
                key[i] = hi;
                radix_layout<std::uint32_t>::count(hist, hi);
                payload[i] = (k << 32) | pack(i, l);
            },
            scores_arg);
        buf.sort(n);
        refine_runs(buf.keys, buf.payload, n);
        return {buf.keys, buf.payload, n};
    }
}

/// Doubled U and class counts of sorted rows (the scan of doubled_mann_whitney).
template <class T>
rank_sum_counts doubled_mann_whitney(const sorted_rows<T>& r) noexcept {
    std::uint64_t a = 0, b = 0, pos = 0, neg = 0, neg_start = 0, pos_start = 0;
    for (std::size_t i = 0; i < r.n; ++i) {
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
    return r.u / r.positive / r.negative;
}

} // namespace detail
HELDOUT_NAMESPACE_END
