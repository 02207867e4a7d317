// heldout/measure/ranked_sample.hpp — a sample of 0/1 truth and scores sorted once, with exact
// tie groups, for fast AUCs of re-weighted rows (the bootstrap of measure::auc).
//
//   heldout::ranked_sample r(truth, scores);
//   double a = r.auc();                       // the exact AUC
//   r.row(0);                                 // original row of the lowest score
#pragma once

#include <heldout/core/values.hpp>
#include <heldout/detail/ranks.hpp>
#include <heldout/detail/validate.hpp>

#include <cstddef>
#include <cstdint>
#include <span>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// A sample sorted once by score, with exact tie groups, for fast AUCs of re-weighted rows
/// (the bootstrap: one O(n) pass per replicate instead of a resample and a sort).
///
///   heldout::ranked_sample r(truth, scores);
///   std::vector<std::uint32_t> c(r.size());           // multiplicity of the row at each rank
///   for (std::size_t i = 0; i < r.size(); ++i) ...     // r.row(i): original row of rank i
///   double a = r.auc_in_rank_order(c);
///
/// Ranks run 0..n-1 in ascending score order (ties in original row order). No allocation
/// after construction.
class ranked_sample {
public:
    /// Sorts (truth, scores) once; the same checks and errors as measure::auc, except that a
    /// missing class is reported only when an AUC is asked for.
    template <label_range T, real_range S>
    ranked_sample(const T& truth, const S& scores) {
        static_assert(detail::rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        auto y = values_of(truth, who(), "truth");
        auto s = values_of(scores, who(), "scores");
        build(y, s);
    }

    std::size_t size() const noexcept { return rows_.size(); }
    std::size_t positives() const noexcept { return static_cast<std::size_t>(positives_); }
    std::size_t negatives() const noexcept { return static_cast<std::size_t>(negatives_); }
    /// Number of distinct scores.
    std::size_t groups() const noexcept { return groups_; }

    /// Original row of rank i.
    std::uint32_t row(std::size_t i) const noexcept { return rows_[i]; }
    /// Original rows in rank order (ascending score).
    std::span<const std::uint32_t> rows() const noexcept { return rows_; }
    /// True when the row at rank i is a positive (truth 1).
    bool positive(std::size_t i) const noexcept { return (flags_[i] & 1u) != 0; }
    /// True when rank i is the last of its tie group (the next rank has a higher score).
    bool ends_group(std::size_t i) const noexcept { return (flags_[i] & 2u) != 0; }

    /// The exact AUC of the sample (undefined_error when a class is absent).
    double auc() const {
        detail::check_both_classes(who(), static_cast<double>(positives_), static_cast<double>(negatives_), false);
        return static_cast<double>(static_cast<long double>(doubled_u_) /
                                   (2.0L * static_cast<long double>(positives_) * negatives_));
    }

    /// The AUC with weights indexed by original row (one O(n) pass, no sort).
    double auc(std::span<const double> weights_by_row) const {
        detail::check_same_size(who(), "weights_by_row", size(), weights_by_row.size(), "the sample");
        detail::compensated_sum u, below, pos;
        double gp = 0, gn = 0, top = 0;
        for (const double w : weights_by_row)
            top = w > top ? w : top;
        // The weights scaled by a power of two (exact) so that the products of weight sums in
        // u neither overflow nor underflow (see detail::unit_scale); the AUC, a ratio, keeps
        // every bit.
        const double scale = detail::unit_scale(top);
        bool bad = false;
        const std::size_t n = size();
        for (std::size_t i = 0; i < n; ++i) {
            const double w = weights_by_row[rows_[i]] * scale;
            bad |= !(w >= 0 && w <= std::numeric_limits<double>::max());
            const std::uint8_t f = flags_[i];
            ((f & 1u) ? gp : gn) += w;
            if (f & 2u) {
                u.add(gp * (below.value() + 0.5 * gn));
                below.add(gn);
                pos.add(gp);
                gp = gn = 0;
            }
        }
        if (bad)
            detail::check_weights(who(), weights_by_row);
        detail::check_both_classes(who(), pos.value(), below.value(), true);
        return u.value() / pos.value() / below.value();
    }

    /// The AUC with integer multiplicities given in rank order (counts[i] for rank i), e.g.
    /// multinomial bootstrap counts: exact integer arithmetic, one O(n) pass.
    double auc_in_rank_order(std::span<const std::uint32_t> counts) const {
        const auto r = rank_order_sums(counts);
        detail::check_both_classes(who(), static_cast<double>(r.positives), static_cast<double>(r.negatives), true);
        return ratio(r);
    }

    /// As auc_in_rank_order, but an empty optional instead of undefined_error when the
    /// counts leave a class without weight (common in small bootstrap samples).
    std::optional<double> try_auc_in_rank_order(std::span<const std::uint32_t> counts) const {
        const auto r = rank_order_sums(counts);
        if (r.positives == 0 || r.negatives == 0)
            return std::nullopt;
        return ratio(r);
    }

private:
    static std::string_view who() { return "heldout::ranked_sample"; }

    static double ratio(const detail::rank_sum_counts& r) noexcept {
        return static_cast<double>(static_cast<long double>(r.doubled_u) /
                                   (2.0L * static_cast<long double>(r.positives) * r.negatives));
    }

    detail::rank_sum_counts rank_order_sums(std::span<const std::uint32_t> counts) const {
        detail::check_same_size(who(), "counts", size(), counts.size(), "the sample");
        std::uint64_t u2 = 0, neg_below = 0, gp = 0, gn = 0, pos = 0;
        const std::size_t n = size();
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint64_t c = counts[i];
            const std::uint8_t f = flags_[i];
            const std::uint64_t is_pos = 0 - static_cast<std::uint64_t>(f & 1u);
            gp += c & is_pos;
            gn += c & ~is_pos;
            const std::uint64_t end = 0 - static_cast<std::uint64_t>((f >> 1) & 1u);
            u2 += (gp * (2 * neg_below + gn)) & end;
            neg_below += gn & end;
            pos += gp & end;
            gp &= ~end;
            gn &= ~end;
        }
        // 2U <= 2 m n stays below 2^64 while the total count is below 2^32.
        if (pos + neg_below > std::numeric_limits<std::uint32_t>::max())
            detail::fail(who(), "counts", "total count exceeds 2^32 - 1");
        return {u2, pos, neg_below};
    }

    template <class L, class T>
    void build(std::span<const L> y, std::span<const T> s) {
        const auto r = detail::sort_rows(who(), s, y, detail::thread_scratch());
        const std::size_t n = r.n;
        rows_.resize(n);
        flags_.resize(n);
        std::uint64_t u2 = 0, neg_below = 0, gp = 0, gn = 0, pos = 0;
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint32_t v = r.at(i);
            const std::uint32_t l = v >> 31;
            const bool end = i + 1 == n || !r.same(i + 1);
            rows_[i] = v & ~detail::label_bit;
            flags_[i] = static_cast<std::uint8_t>(l | (end ? 2u : 0u));
            gp += l;
            gn += 1 - l;
            if (end) {
                u2 += gp * (2 * neg_below + gn);
                neg_below += gn;
                pos += gp;
                gp = gn = 0;
                ++groups_;
            }
        }
        doubled_u_ = u2;
        positives_ = pos;
        negatives_ = neg_below;
    }

    std::vector<std::uint32_t> rows_;
    std::vector<std::uint8_t> flags_; // bit 0: label, bit 1: last rank of its tie group
    std::uint64_t doubled_u_ = 0;
    std::uint64_t positives_ = 0;
    std::uint64_t negatives_ = 0;
    std::size_t groups_ = 0;
};

HELDOUT_NAMESPACE_END
