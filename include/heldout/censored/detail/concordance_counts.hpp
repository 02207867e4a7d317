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

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <numeric>
#include <span>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Fenwick tree of doubles over positions 1..n.
class fenwick {
public:
    explicit fenwick(std::size_t n) : t_(n + 1, 0.0) {}
    void add(std::size_t pos, double v) noexcept {
        for (; pos < t_.size(); pos += pos & (~pos + 1))
            t_[pos] += v;
    }
    /// Sum of positions 1..pos.
    double prefix(std::size_t pos) const noexcept {
        double s = 0;
        for (; pos > 0; pos -= pos & (~pos + 1))
            s += t_[pos];
        return s;
    }

private:
    std::vector<double> t_;
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
    concordance_counts out;
    if (per_row) {
        out.row_concordant.assign(n, 0.0);
        out.row_discordant.assign(n, 0.0);
        out.row_tied.assign(n, 0.0);
    }
    // dense ranks of the scores, 1-based; == groups -0.0 with 0.0
    std::vector<std::size_t> by_score(n);
    std::iota(by_score.begin(), by_score.end(), std::size_t{0});
    std::sort(by_score.begin(), by_score.end(), [&](std::size_t a, std::size_t b) { return score[a] < score[b]; });
    std::vector<std::size_t> rank(n);
    std::size_t ranks = 0;
    for (std::size_t k = 0; k < n; ++k) {
        if (k == 0 || score[by_score[k]] != score[by_score[k - 1]])
            ++ranks;
        rank[by_score[k]] = ranks;
    }
    std::vector<std::size_t> by_time(n);
    std::iota(by_time.begin(), by_time.end(), std::size_t{0});
    std::sort(by_time.begin(), by_time.end(), [&](std::size_t a, std::size_t b) { return time[a] < time[b]; });

    // Sweep 1, decreasing time: the tree counts the rows later than the current group.
    {
        fenwick tree(ranks);
        double inserted = 0;
        for (std::size_t hi = n; hi > 0;) {
            std::size_t lo = hi;
            const double s = time[by_time[hi - 1]];
            while (lo > 0 && time[by_time[lo - 1]] == s)
                --lo;
            for (std::size_t k = lo; k < hi; ++k) // censorings at s count as later than events at s
                if (!event[by_time[k]]) {
                    tree.add(rank[by_time[k]], 1.0);
                    inserted += 1;
                }
            for (std::size_t k = lo; k < hi; ++k) {
                const std::size_t i = by_time[k];
                if (!event[i] || weight[i] == 0)
                    continue;
                const double below = tree.prefix(rank[i] - 1);
                const double upto = tree.prefix(rank[i]);
                const double c = weight[i] * below, t = weight[i] * (upto - below), d = weight[i] * (inserted - upto);
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
                if (event[by_time[k]]) {
                    tree.add(rank[by_time[k]], 1.0);
                    inserted += 1;
                }
            hi = lo;
        }
    }
    if (!per_row)
        return out;
    // Sweep 2, increasing time: the tree holds u_i of the events earlier than row j.
    fenwick tree(ranks);
    double inserted = 0;
    auto later_side = [&](std::size_t j) {
        const double below = tree.prefix(rank[j] - 1);
        const double upto = tree.prefix(rank[j]);
        out.row_concordant[j] += inserted - upto; // earlier event scored higher
        out.row_tied[j] += upto - below;
        out.row_discordant[j] += below;
    };
    for (std::size_t lo = 0; lo < n;) {
        std::size_t hi = lo;
        const double s = time[by_time[lo]];
        while (hi < n && time[by_time[hi]] == s)
            ++hi;
        for (std::size_t k = lo; k < hi; ++k)
            if (event[by_time[k]])
                later_side(by_time[k]);
        for (std::size_t k = lo; k < hi; ++k) {
            const std::size_t i = by_time[k];
            if (event[i] && weight[i] != 0) {
                tree.add(rank[i], weight[i]);
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
