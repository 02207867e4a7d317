// heldout/detail/query_rank.hpp — the per-query machinery of the query measures: grouping
// rows by query, the tie blocks at the head of a ranking, and the tie-exact expectations.
// Internal: include <heldout/query.hpp> instead.
//
// Ties are exact (McSherry & Najork 2008): items with equal scores form a tie block; every
// order of a block is equally likely, so every item of a block of n items, r of them
// relevant, gain sum G, is at every position of the block with probability 1/n. The
// measures are expectations over those orders (docs/query.md derives each formula):
//   E[DCG@k]              = sum_b (G_b / n_b) sum_{p in block b, p <= k} 1 / log2(1 + p)
//   E[# relevant in top k] = sum_b r_b |block b ∩ [1, k]| / n_b
//   E[RR]                 = sum_{x=0}^{n-r} P(X = x) / (s + x): block of the first relevant
//                           item starting at position s, X non-relevant items before its first
//                           relevant one, P(X = 0) = r/n, P(X = x+1) = P(X = x) (n-r-x)/(n-1-x)
//   E[AP@k] D             = sum_{p <= k} (1/p) (E[rel_p] + sum_{j<p} E[rel_p rel_j]), with
//                           E[rel_p] = r_b/n_b, the earlier blocks contributing (r_b/n_b) R_before
//                           and the (p - s_b) earlier positions of its own block r_b (r_b - 1) /
//                           (n_b (n_b - 1)) each
// Speed: only the head matters for a cutoff k. The k-th largest score t is found by
// selection (std::nth_element, linear time); the items above t (fewer than k) are sorted; the
// items equal to t form the last block whatever their number. So NDCG@k, P@k and R@k of a
// query of n items cost O(n + k log k), reciprocal rank O(n); a whole-list measure (k = 0)
// sorts the query.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/query/gains.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

// ---------------------------------------------------------------- grouping rows by query

/// Rows grouped by query: ids in order of first appearance and the row ranges of each. When
/// every query's rows are contiguous, query g is rows [offsets[g], offsets[g + 1]) and `rows`
/// is empty (no copy, no sort); otherwise rows[offsets[g] .. offsets[g + 1]) lists query g's
/// row numbers in increasing order.
struct query_groups {
    std::vector<std::int64_t> ids;
    std::vector<std::size_t> offsets;
    std::vector<std::size_t> rows;
    // scratch: runs of equal ids, their query, and an open-addressing table id -> query
    std::vector<std::size_t> run_start;
    std::vector<std::size_t> group_of_run;
    std::vector<std::int64_t> slot_id;
    std::vector<std::size_t> slot_group;

    bool contiguous() const noexcept { return rows.empty(); }
    std::size_t size() const noexcept { return ids.size(); }

    static constexpr std::size_t empty = static_cast<std::size_t>(-1);

    /// The query number of id, a new one (the next number) when id is new.
    std::size_t find_or_add(std::int64_t id, bool& added) {
        if (2 * (ids.size() + 1) > slot_id.size())
            grow();
        const std::size_t mask = slot_id.size() - 1;
        std::size_t i = hash(id) & mask;
        while (slot_group[i] != empty) {
            if (slot_id[i] == id) {
                added = false;
                return slot_group[i];
            }
            i = (i + 1) & mask;
        }
        slot_id[i] = id;
        slot_group[i] = ids.size();
        ids.push_back(id);
        added = true;
        return slot_group[i];
    }

private:
    static std::size_t hash(std::int64_t id) noexcept {
        // Fibonacci hashing: the high bits of id * 2^64/phi, well spread for consecutive ids.
        return static_cast<std::size_t>((static_cast<std::uint64_t>(id) * 0x9E3779B97F4A7C15ULL) >> 20);
    }
    void grow() {
        const std::size_t cap = slot_id.empty() ? 1024 : 2 * slot_id.size();
        slot_id.assign(cap, 0);
        slot_group.assign(cap, empty);
        const std::size_t mask = cap - 1;
        for (std::size_t g = 0; g < ids.size(); ++g) {
            std::size_t i = hash(ids[g]) & mask;
            while (slot_group[i] != empty)
                i = (i + 1) & mask;
            slot_id[i] = ids[g];
            slot_group[i] = g;
        }
    }
};

template <class Q>
std::int64_t query_id(Q q, std::size_t i, std::string_view who) {
    if constexpr (std::is_unsigned_v<Q> && sizeof(Q) >= sizeof(std::int64_t)) {
        if (q > static_cast<Q>(std::numeric_limits<std::int64_t>::max()))
            fail_at(who, "query", "query id too large (above 2^63 - 1)", i);
    } else {
        (void)i;
        (void)who;
    }
    return static_cast<std::int64_t>(q);
}

/// Groups the rows of q by query id: runs of equal ids (one pass), each run's id looked up in
/// a hash table (no sort). Only when an id comes back after another one are the rows
/// regrouped, by a stable counting pass.
template <class Q>
void group_queries(std::span<const Q> q, query_groups& g, std::string_view who) {
    g.ids.clear();
    g.offsets.clear();
    g.rows.clear();
    g.run_start.clear();
    g.group_of_run.clear();
    std::fill(g.slot_group.begin(), g.slot_group.end(), query_groups::empty);
    const std::size_t n = q.size();
    bool repeated = false;
    for (std::size_t i = 0; i < n; ++i)
        if (i == 0 || q[i] != q[i - 1]) {
            bool added = false;
            g.group_of_run.push_back(g.find_or_add(query_id(q[i], i, who), added));
            repeated = repeated || !added;
            g.run_start.push_back(i);
        }
    g.run_start.push_back(n);
    if (!repeated) {
        g.offsets.assign(g.run_start.begin(), g.run_start.end());
        return;
    }
    // A query's rows come back after other queries: regroup them, queries numbered by first
    // appearance, rows in increasing order within each.
    const std::size_t groups = g.ids.size(), runs = g.group_of_run.size();
    g.offsets.assign(groups + 1, 0);
    for (std::size_t r = 0; r < runs; ++r)
        g.offsets[g.group_of_run[r] + 1] += g.run_start[r + 1] - g.run_start[r];
    for (std::size_t k = 0; k < groups; ++k)
        g.offsets[k + 1] += g.offsets[k];
    std::vector<std::size_t> next(g.offsets.begin(), g.offsets.end() - 1);
    g.rows.resize(n);
    for (std::size_t r = 0; r < runs; ++r)
        for (std::size_t i = g.run_start[r]; i < g.run_start[r + 1]; ++i)
            g.rows[next[g.group_of_run[r]]++] = i;
}

/// Whether every value is finite, in one branch-free (vectorisable) pass: x - x is 0 for a
/// finite x and NaN otherwise.
template <class T>
bool all_finite(std::span<const T> v) noexcept {
    if constexpr (std::is_floating_point_v<T>) {
        bool ok = true;
        for (const T x : v)
            ok &= (x - x) == T(0);
        return ok;
    } else {
        (void)v;
        return true;
    }
}

// ---------------------------------------------------------------- one query's ranking

/// An item at the head of a ranking.
struct ranked_item {
    double score;
    double gain;
    double relevant; // 1 when relevance > 0
};

/// A tie block: positions [start, start + size) (0-based) of the ranking, with its number of
/// relevant items and its gain sum.
struct tie_block {
    std::size_t start = 0;
    std::size_t size = 0;
    double relevant = 0;
    double gain = 0;
};

/// Scratch buffers of one accumulator, kept across queries and batches.
struct query_workspace {
    std::vector<double> scores;
    std::vector<ranked_item> items;
    std::vector<tie_block> blocks;
    std::vector<double> gains;
    std::vector<double> disc; // disc[p] = 1 / log2(p + 2): the discount of 0-based position p
    std::vector<double> gathered_scores;
    std::vector<double> gathered_relevance;

    /// The discounts of positions 0..n-1.
    const double* discounts(std::size_t n) {
        for (std::size_t p = disc.size(); p < n; ++p)
            disc.push_back(discount(p + 1));
        return disc.data();
    }
};

/// The gain of an item (integral relevance below 63 by shifting: exact and fast).
template <class R>
inline double item_gain(gain g, R r) noexcept {
    if constexpr (std::is_integral_v<R>) {
        if (g == gain::linear)
            return static_cast<double>(r);
        const auto u = static_cast<std::uint64_t>(r);
        if (u < 63)
            return static_cast<double>((std::uint64_t{1} << u) - 1);
        return std::exp2(static_cast<double>(u)) - 1.0;
    } else {
        return gain_of(g, r);
    }
}

template <class R>
inline bool is_relevant(R r) noexcept {
    return r > R(0);
}

/// The number of relevant items of a query.
template <class R>
std::size_t relevant_count(std::span<const R> rel) noexcept {
    std::size_t c = 0;
    for (const R r : rel)
        c += is_relevant(r) ? 1u : 0u;
    return c;
}

/// The K-th largest score (0 < K < n). A small cutoff keeps the K best in a sorted buffer: one
/// pass, and for scores in random order only about K ln(n/K) insertions; a large one selects
/// with std::nth_element (linear time).
template <class S>
double kth_largest(std::span<const S> s, std::size_t K, query_workspace& ws) {
    const std::size_t n = s.size();
    if (K <= 32 && 4 * K <= n) {
        S buf[32]; // compared in the scores' own type: no conversion in the loop
        for (std::size_t i = 0; i < K; ++i) {
            const S x = s[i];
            std::size_t j = i;
            for (; j > 0 && buf[j - 1] < x; --j)
                buf[j] = buf[j - 1];
            buf[j] = x;
        }
        S t = buf[K - 1];
        for (std::size_t i = K; i < n; ++i) {
            const S x = s[i];
            if (x > t) {
                std::size_t j = K - 1;
                for (; j > 0 && buf[j - 1] < x; --j)
                    buf[j] = buf[j - 1];
                buf[j] = x;
                t = buf[K - 1];
            }
        }
        return static_cast<double>(t);
    }
    ws.scores.resize(n);
    for (std::size_t i = 0; i < n; ++i)
        ws.scores[i] = static_cast<double>(s[i]);
    std::nth_element(ws.scores.begin(), ws.scores.begin() + static_cast<std::ptrdiff_t>(K - 1), ws.scores.end(),
                     std::greater<double>());
    return ws.scores[K - 1];
}

/// Forms tie blocks from items sorted by decreasing score, starting at position `start`.
inline void blocks_of_sorted(std::span<const ranked_item> items, std::size_t start, std::vector<tie_block>& out) {
    for (std::size_t i = 0; i < items.size();) {
        tie_block b{start + i, 0, 0, 0};
        const double s = items[i].score;
        for (; i < items.size() && items[i].score == s; ++i) {
            ++b.size;
            b.relevant += items[i].relevant;
            b.gain += items[i].gain;
        }
        out.push_back(b);
    }
}

/// The tie blocks covering positions [0, K) of the ranking by decreasing score (0 < K <= n).
/// The last block is complete (it may reach past K). Gains are computed when `with_gain`.
template <class S, class R>
void head_blocks(std::span<const S> s, std::span<const R> rel, std::size_t K, bool with_gain, gain g,
                 query_workspace& ws) {
    const std::size_t n = s.size();
    ws.items.clear();
    ws.blocks.clear();
    auto item = [&](std::size_t i) {
        return ranked_item{static_cast<double>(s[i]), with_gain ? item_gain(g, rel[i]) : 0.0,
                           is_relevant(rel[i]) ? 1.0 : 0.0};
    };
    auto by_score = [](const ranked_item& a, const ranked_item& b) { return a.score > b.score; };
    if (K >= n) {
        for (std::size_t i = 0; i < n; ++i)
            ws.items.push_back(item(i));
        std::sort(ws.items.begin(), ws.items.end(), by_score);
        blocks_of_sorted(ws.items, 0, ws.blocks);
        return;
    }
    // t = the K-th largest score; the items above it are fewer than K, and every item equal
    // to t belongs to the block that straddles (or ends at) position K.
    const double t = kth_largest(s, K, ws);
    tie_block edge;
    for (std::size_t i = 0; i < n; ++i) {
        const double x = static_cast<double>(s[i]);
        if (x > t) {
            ws.items.push_back(item(i));
        } else if (x == t) {
            ++edge.size;
            edge.relevant += is_relevant(rel[i]) ? 1.0 : 0.0;
            if (with_gain)
                edge.gain += item_gain(g, rel[i]);
        }
    }
    std::sort(ws.items.begin(), ws.items.end(), by_score);
    blocks_of_sorted(ws.items, 0, ws.blocks);
    edge.start = ws.items.size();
    ws.blocks.push_back(edge);
}

/// Positions of block b within the head [0, K).
inline std::size_t covered(const tie_block& b, std::size_t K) noexcept {
    const std::size_t end = std::min(b.start + b.size, K);
    return end > b.start ? end - b.start : 0;
}

/// E[DCG@K] over the orders of tied items, from the head blocks.
inline double expected_dcg(std::span<const tie_block> blocks, std::size_t K, query_workspace& ws) {
    const double* d = ws.discounts(K);
    double total = 0;
    for (const auto& b : blocks) {
        const std::size_t m = covered(b, K);
        if (m == 0 || b.gain == 0)
            continue;
        double ds = 0;
        for (std::size_t p = b.start; p < b.start + m; ++p)
            ds += d[p];
        total += b.size == 1 ? b.gain * ds : (b.gain / static_cast<double>(b.size)) * ds;
    }
    return total;
}

/// IDCG@K: the DCG of the query's gains sorted decreasingly (ties do not matter there).
template <class R>
double ideal_dcg(std::span<const R> rel, std::size_t K, gain g, query_workspace& ws) {
    if constexpr (std::is_integral_v<R>) {
        // Small integer relevance: a histogram replaces the selection (the ideal order is by value).
        std::size_t count[64] = {};
        bool small = true;
        for (const R r : rel) {
            const auto u = static_cast<std::uint64_t>(r);
            small &= u < 64;
            count[u & 63u] += 1;
        }
        if (small) {
            const double* d = ws.discounts(K);
            double total = 0;
            std::size_t p = 0;
            for (std::size_t v = 63; v > 0 && p < K; --v)
                for (std::size_t c = count[v]; c > 0 && p < K; --c, ++p)
                    total += item_gain(g, static_cast<R>(v)) * d[p];
            return total;
        }
    }
    ws.gains.clear();
    for (const R r : rel)
        if (is_relevant(r))
            ws.gains.push_back(item_gain(g, r));
    const std::size_t m = std::min(K, ws.gains.size());
    if (m == 0)
        return 0.0;
    if (m < ws.gains.size())
        std::nth_element(ws.gains.begin(), ws.gains.begin() + static_cast<std::ptrdiff_t>(m - 1), ws.gains.end(),
                         std::greater<double>());
    std::sort(ws.gains.begin(), ws.gains.begin() + static_cast<std::ptrdiff_t>(m), std::greater<double>());
    const double* d = ws.discounts(m);
    double total = 0;
    for (std::size_t p = 0; p < m; ++p)
        total += ws.gains[p] * d[p];
    return total;
}

/// E[number of relevant items among the top K] (0 < K) and the number of relevant items of
/// the query, in O(n) by selection.
struct top_count {
    double in_top = 0;
    std::size_t relevant = 0;
};

template <class S, class R>
top_count expected_relevant_in_top(std::span<const S> s, std::span<const R> rel, std::size_t K, query_workspace& ws) {
    const std::size_t n = s.size();
    if (K >= n) {
        const std::size_t r = relevant_count(rel);
        return {static_cast<double>(r), r};
    }
    const double t = kth_largest(s, K, ws);
    std::size_t above = 0, relevant_above = 0, at = 0, relevant_at = 0, relevant = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const double x = static_cast<double>(s[i]);
        const std::size_t r = is_relevant(rel[i]) ? 1u : 0u;
        const std::size_t gt = x > t ? 1u : 0u, eq = x == t ? 1u : 0u;
        above += gt;
        relevant_above += gt & r;
        at += eq;
        relevant_at += eq & r;
        relevant += r;
    }
    // The block of t holds positions above+1 .. above+at; K - above of them are in the top K.
    const double share =
        relevant_at == 0 ? 0.0
                         : static_cast<double>(relevant_at) * static_cast<double>(K - above) / static_cast<double>(at);
    return {static_cast<double>(relevant_above) + share, relevant};
}

/// E[1 / rank of the first relevant item]; the query has a relevant item.
template <class S, class R>
double expected_reciprocal_rank(std::span<const S> s, std::span<const R> rel) {
    double top = -std::numeric_limits<double>::infinity();
    bool any = false;
    for (std::size_t i = 0; i < s.size(); ++i)
        if (is_relevant(rel[i]) && (!any || static_cast<double>(s[i]) > top)) {
            top = static_cast<double>(s[i]);
            any = true;
        }
    HELDOUT_ASSERT(any);
    std::size_t above = 0, at = 0, relevant_at = 0;
    for (std::size_t i = 0; i < s.size(); ++i) {
        const double x = static_cast<double>(s[i]);
        if (x > top)
            ++above;
        else if (x == top) {
            ++at;
            relevant_at += is_relevant(rel[i]) ? 1u : 0u;
        }
    }
    // X = non-relevant items of the block before its first relevant one:
    // P(X = x) = C(n - 1 - x, r - 1) / C(n, r), built by the ratio of consecutive terms.
    const double n = static_cast<double>(at), r = static_cast<double>(relevant_at);
    double p = r / n, total = 0;
    for (std::size_t x = 0; x + relevant_at <= at; ++x) {
        total += p / static_cast<double>(above + 1 + x);
        const double xd = static_cast<double>(x);
        if (n - 1 - xd > 0)
            p *= (n - r - xd) / (n - 1 - xd);
    }
    return total;
}

/// E[sum_{p <= K} rel_p P@p] over the orders of tied items, from the head blocks (divide by
/// the normaliser for AP@K).
inline double expected_precision_sum(std::span<const tie_block> blocks, std::size_t K) {
    double before = 0; // relevant items in earlier blocks
    double total = 0;
    for (const auto& b : blocks) {
        const std::size_t m = covered(b, K);
        if (m > 0 && b.relevant > 0) {
            const double nb = static_cast<double>(b.size);
            const double single = b.relevant / nb;
            const double pair = b.size > 1 ? b.relevant * (b.relevant - 1) / (nb * (nb - 1)) : 0.0;
            for (std::size_t p = b.start; p < b.start + m; ++p) {
                const double within = static_cast<double>(p - b.start); // earlier positions of the block
                total += (single * (1.0 + before) + within * pair) / static_cast<double>(p + 1);
            }
        }
        before += b.relevant;
    }
    return total;
}

} // namespace detail
HELDOUT_NAMESPACE_END
