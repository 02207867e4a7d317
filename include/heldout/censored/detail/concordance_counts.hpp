// heldout/censored/detail/concordance_counts.hpp — weighted comparable-pair counts of a risk
// score against censored times in O(n log n), with each row's share (for the infinitesimal
// jackknife). Internal: harrell_c, uno_c and concordance_estimate build on it.
//
// A pair (i, j) is comparable when row i is an event with weight u_i > 0 and row j is later:
// T_j > T_i, or T_j == T_i with j censored (an event precedes a censoring at its own time);
// two events at one time are not comparable. The pair weighs u_i; it is concordant when
// r_i > r_j, discordant when r_i < r_j, tied when r_i == r_j (-0.0 == 0.0).
// Two sweeps with a Fenwick tree over score ranks: by decreasing time (row i's later rows)
// and by increasing time (row j's earlier events).
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>
#include <heldout/detail/radix_sort.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <numeric>
#include <span>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Fenwick tree over positions 1..n (counts as uint32, weights as double).
template <class T>
class fenwick {
public:
    explicit fenwick(std::size_t n) : t_(n + 1, T(0)) {}
    void add(std::size_t pos, T v) noexcept {
        for (; pos < t_.size(); pos += pos & (~pos + 1))
            t_[pos] += v;
    }
    /// Sum of positions 1..pos.
    T prefix(std::size_t pos) const noexcept {
        T s = 0;
        for (; pos > 0; pos -= pos & (~pos + 1))
            s += t_[pos];
        return s;
    }

private:
    std::vector<T> t_;
};

/// Rows in ascending order of a non-NaN double (ties in row order), with their order keys
/// (equal keys = equal values, -0.0 folded onto 0.0): an LSD radix sort on the 64-bit order
/// key, several times faster than std::sort of row indices.
struct order_of_values {
    std::vector<std::uint64_t> key;
    std::vector<std::size_t> row;

    explicit order_of_values(std::span<const double> x) : key(x.size()), row(x.size()) {
        const std::size_t n = x.size();
        if (n < (std::size_t{1} << 32)) {
            std::vector<std::uint64_t> key_tmp(n);
            std::vector<std::uint32_t> p(n), p_tmp(n);
            for (std::size_t i = 0; i < n; ++i) {
                key[i] = order_key(x[i]);
                p[i] = static_cast<std::uint32_t>(i);
            }
            const bool in_tmp = radix_sort(key.data(), key_tmp.data(), p.data(), p_tmp.data(), n);
            if (in_tmp) {
                key.swap(key_tmp);
                p.swap(p_tmp);
            }
            for (std::size_t i = 0; i < n; ++i)
                row[i] = p[i];
        } else {
            std::iota(row.begin(), row.end(), std::size_t{0});
            std::stable_sort(row.begin(), row.end(), [&](std::size_t a, std::size_t b) { return x[a] < x[b]; });
            for (std::size_t i = 0; i < n; ++i)
                key[i] = order_key(x[row[i]]);
        }
    }
};

/// Weighted pair counts, in total and per row (the row's pairs, either side).
struct concordance_counts {
    double concordant = 0, discordant = 0, tied = 0;
    std::vector<double> row_concordant, row_discordant, row_tied; // filled when asked

    double comparable() const noexcept { return concordant + discordant + tied; }
    double value() const noexcept { return (concordant + 0.5 * tied) / comparable(); }
};

/// Counts the pairs; `weight[i]` is u_i (0 = row i never the earlier member). Inputs are
/// checked rows of equal size.
inline concordance_counts count_concordance(std::span<const double> time, std::span<const std::uint8_t> event,
                                            std::span<const double> score, std::span<const double> weight,
                                            bool per_row) {
    const std::size_t n = time.size();
    if (n >= (std::size_t{1} << 32)) // the counts of sweep 1 are 32-bit
        fail("heldout::censored", "time", "more than 2^32 - 1 rows");
    concordance_counts out;
    if (per_row) {
        out.row_concordant.assign(n, 0.0);
        out.row_discordant.assign(n, 0.0);
        out.row_tied.assign(n, 0.0);
    }
    // dense ranks of the scores, 1-based; equal keys group -0.0 with 0.0
    std::vector<std::size_t> rank(n);
    std::size_t ranks = 0;
    {
        const order_of_values by_score(score);
        for (std::size_t k = 0; k < n; ++k) {
            if (k == 0 || by_score.key[k] != by_score.key[k - 1])
                ++ranks;
            rank[by_score.row[k]] = ranks;
        }
    }
    const order_of_values sorted_time(time);
    const auto& by_time = sorted_time.row;
    // rank and event in time order: the sweeps then read them sequentially
    std::vector<std::uint32_t> rank_t(n);
    std::vector<std::uint8_t> event_t(n);
    for (std::size_t k = 0; k < n; ++k) {
        rank_t[k] = static_cast<std::uint32_t>(rank[by_time[k]]);
        event_t[k] = event[by_time[k]];
    }
    // Sweep 1, decreasing time: the tree counts the rows later than the current group
    // (integer counts, exact).
    {
        fenwick<std::uint32_t> tree(ranks);
        std::vector<std::uint32_t> at_rank(ranks + 1, 0);
        std::uint32_t inserted = 0;
        for (std::size_t hi = n; hi > 0;) {
            std::size_t lo = hi;
            const auto s = sorted_time.key[hi - 1];
            while (lo > 0 && sorted_time.key[lo - 1] == s)
                --lo;
            for (std::size_t k = lo; k < hi; ++k) // censorings at s count as later than events at s
                if (!event_t[k]) {
                    tree.add(rank_t[k], 1);
                    ++at_rank[rank_t[k]];
                    ++inserted;
                }
            for (std::size_t k = lo; k < hi; ++k) {
                if (!event_t[k])
                    continue;
                const std::size_t i = by_time[k];
                const double u = weight[i];
                if (u == 0)
                    continue;
                // one tree query; the ties come from the per-rank counts
                const std::uint32_t below = tree.prefix(rank_t[k] - 1);
                const std::uint32_t tied = at_rank[rank_t[k]];
                const double c = u * below, t = u * tied, d = u * (inserted - below - tied);
                out.concordant += c;
                out.tied += t;
                out.discordant += d;
                if (per_row) {
                    out.row_concordant[i] += c;
                    out.row_tied[i] += t;
                    out.row_discordant[i] += d;
                }
            }
            for (std::size_t k = lo; k < hi; ++k)
                if (event_t[k]) {
                    tree.add(rank_t[k], 1);
                    ++at_rank[rank_t[k]];
                    ++inserted;
                }
            hi = lo;
        }
    }
    if (!per_row)
        return out;
    // Sweep 2, increasing time: the tree holds u_i of the events earlier than row j.
    fenwick<double> tree(ranks);
    std::vector<double> at_rank(ranks + 1, 0.0);
    double inserted = 0;
    auto later_side = [&](std::size_t j) {
        const double below = tree.prefix(rank[j] - 1);
        const double upto = below + at_rank[rank[j]];
        out.row_concordant[j] += inserted - upto; // earlier event scored higher
        out.row_tied[j] += upto - below;
        out.row_discordant[j] += below;
    };
    for (std::size_t lo = 0; lo < n;) {
        std::size_t hi = lo;
        const auto s = sorted_time.key[lo];
        while (hi < n && sorted_time.key[hi] == s)
            ++hi;
        for (std::size_t k = lo; k < hi; ++k)
            if (event[by_time[k]])
                later_side(by_time[k]);
        for (std::size_t k = lo; k < hi; ++k) {
            const std::size_t i = by_time[k];
            if (event[i] && weight[i] != 0) {
                tree.add(rank[i], weight[i]);
                at_rank[rank[i]] += weight[i];
                inserted += weight[i];
            }
        }
        for (std::size_t k = lo; k < hi; ++k)
            if (!event[by_time[k]])
                later_side(by_time[k]);
        lo = hi;
    }
    return out;
}

} // namespace detail
HELDOUT_NAMESPACE_END
