// heldout/plan/kfold.hpp — k-fold cross-validation: plain, stratified, grouped, and
// stratified + grouped (best effort).
//
//   for (const heldout::split& s : heldout::kfold{.folds = 10, .seed = 7}.splits(n)) {
//       fit(s.train); score(s.test);       // s.fold = 0..9, s.repeat = 0
//   }
//   heldout::kfold{.folds = 5, .seed = 1}.splits(heldout::strata(y));      // class shares kept
//   heldout::kfold{.folds = 5, .seed = 1}.splits(heldout::groups(patient)); // no patient split
//
// The assignment, exactly (frozen; the golden test pins it). Repeat r of a plan with seed s
// draws from heldout::rng(s, r) (kfold is repeat 0). Folds are numbered 0..k-1.
//  * Plain, n rows: fold f holds cap_f = floor(n/k) + (f < n mod k) rows. Rows are visited in
//    row order i = 0..n-1 with R = rows not yet assigned: u = rng.below(R); row i goes to the
//    smallest f with cap_0 + ... + cap_f > u (remaining capacities); that cap_f and R drop
//    by one. Every assignment with these fold sizes is equally likely.
//  * Stratified: strata numbered by ascending label (see strata). Stratum c with n_c rows
//    gets floor(n_c/k) rows in each fold plus one more in the n_c mod k folds
//    o_c, o_c+1, ... (mod k), where o_0 = 0 and o_{c+1} = (o_c + n_c) mod k: the extras are
//    dealt round-robin across strata, so a fold's share of each class is within one row of
//    exact and fold sizes differ by at most one. Rows are visited in row order, each drawn
//    as above from its own stratum's remaining capacities. One stratum = plain k-fold.
//  * Grouped: groups numbered by ascending id; the list of groups is shuffled with
//    heldout::shuffle (same rng), stably sorted by size (largest first), and each group goes
//    to the fold with the fewest rows so far (lowest fold number on ties). Every row takes
//    its group's fold. Fold sizes differ by at most the largest group.
//  * Stratified and grouped (best effort): the same group order; each group goes to the fold
//    f minimising sum_c h_c * count_f(c) (h_c = the group's rows of class c, count_f(c) =
//    rows of class c already in f; this is the fold where adding the group increases the
//    squared deviation of class counts from their targets least), ties to the fold with
//    fewer rows, then the lowest number. No group crosses folds; shares are not guaranteed.
//  * Split (r, f), index r*k + f: test = rows of fold f, train = the other rows, ascending.
//
// Bad input (heldout::input_error naming the plan and the argument): folds < 2, folds > n,
// a stratum with fewer rows than folds (an error, not a warning: such a fold would lack the
// class and class measures would be undefined there), fewer groups than folds, a group
// larger than a fold can hold (more than ceil(n/k) rows), empty data, strata and groups of
// different sizes.
#pragma once

#include <heldout/core/random.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <algorithm>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// Smallest bin f with cap[0] + ... + cap[f] > u (u below the capacity total).
inline std::size_t pick_bin(const std::uint32_t* cap, std::uint64_t u) noexcept {
    std::size_t f = 0;
    while (u >= cap[f]) {
        u -= cap[f];
        ++f;
    }
    return f;
}

/// Fenwick tree over bin capacities: the same answer as pick_bin in O(log k), for many folds.
class capacity_tree {
public:
    void build(const std::uint32_t* cap, std::size_t k) {
        k_ = k;
        t_.assign(k + 1, 0);
        for (std::size_t i = 1; i <= k; ++i) {
            t_[i] += cap[i - 1];
            const std::size_t j = i + (i & (~i + 1));
            if (j <= k)
                t_[j] += t_[i];
        }
        top_ = 1;
        while (top_ * 2 <= k)
            top_ *= 2;
    }
    /// Finds the bin for u and takes one unit of its capacity.
    std::size_t take(std::uint64_t u) noexcept {
        std::size_t pos = 0;
        for (std::size_t step = top_; step != 0; step >>= 1)
            if (pos + step <= k_ && t_[pos + step] <= u) {
                pos += step;
                u -= t_[pos];
            }
        for (std::size_t j = pos + 1; j <= k_; j += j & (~j + 1))
            --t_[j];
        return pos;
    }

private:
    std::vector<std::uint64_t> t_;
    std::size_t k_ = 0, top_ = 1;
};

/// One row of the lane draw: u's bin is the number of lanes with cum <= u; the lanes with
/// cum > u each lose one unit. Lanes hold cum ^ 2^31 as int32 (biased), so that the
/// unsigned compare is one signed compare on SSE2. Why vectors: GCC 12 left the plain
/// fixed-width loop scalar (a compare, set and subtract a lane, lanes spilled to the stack);
/// 10-fold assignment of 1e7 rows took 58 ms of bench_plans' 65 ms on an AMD EPYC.
#if defined(__GNUC__) || defined(__clang__)
typedef std::int32_t capacity_i32x4 __attribute__((vector_size(16)));

template <std::size_t L>
HELDOUT_DETAIL_INLINE std::uint32_t take_unit(capacity_i32x4 (&lane)[L / 4], std::uint32_t u) noexcept {
    const std::int32_t b = std::bit_cast<std::int32_t>(u ^ 0x80000000u);
    const capacity_i32x4 ub = {b, b, b, b};
    capacity_i32x4 above{};
    for (std::size_t q = 0; q < L / 4; ++q) {
        const capacity_i32x4 m = lane[q] > ub; // -1 where cum > u
        lane[q] += m;                          // no wrap: a lane above u is at least 1
        above += m;
    }
    return static_cast<std::uint32_t>(-(above[0] + above[1] + above[2] + above[3]));
}
#endif

/// Row-order draw with L lanes of running cumulative capacities per stratum. The bin of u
/// is the number of lanes with cum <= u (the smallest f with cum_f > u, as pick_bin finds).
/// Taking a unit from bin f lowers cum_j for j >= f, and as cum is non-decreasing those are
/// exactly the lanes with cum_j > u: so the update needs no f, and the loop-carried chain is
/// one compare and one subtract a lane (take_unit). Padding lanes start at 2^32 - 1; after t
/// rows they hold 2^32 - 1 - t, still above any u < n - t.
template <std::size_t L, class Lab>
void capacity_assign_lanes(rng& gen, std::span<const std::uint32_t> id, const std::uint32_t* cap,
                           std::size_t strata_count, std::size_t k, std::uint64_t* remaining, std::size_t n, Lab* label,
                           std::vector<std::uint32_t>& cum_buffer) {
    static_assert(L % 4 == 0);
    cum_buffer.resize(strata_count * L);
    std::uint32_t* cum = cum_buffer.data();
    for (std::size_t c = 0; c < strata_count; ++c) {
        std::uint32_t run = 0;
        for (std::size_t j = 0; j < L; ++j) {
            run += j < k ? cap[c * k + j] : 0;
            cum[c * L + j] = j < k ? run : 0xFFFFFFFFu;
        }
    }
    rng g = gen; // a local copy: the byte-sized label stores could alias a referenced state
#if defined(__GNUC__) || defined(__clang__)
    for (std::size_t j = 0; j < strata_count * L; ++j)
        cum[j] ^= 0x80000000u; // biased, see take_unit
    capacity_i32x4 lane[L / 4];
    if (id.empty()) {
        std::memcpy(lane, cum, sizeof lane);
        std::uint64_t rem = remaining[0];
        for (std::size_t i = 0; i < n; ++i, --rem)
            label[i] = static_cast<Lab>(L - take_unit<L>(lane, static_cast<std::uint32_t>(g.below(rem))));
        remaining[0] = rem;
    } else {
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint32_t c = id[i];
            std::uint32_t* at = cum + static_cast<std::size_t>(c) * L;
            std::memcpy(lane, at, sizeof lane);
            label[i] = static_cast<Lab>(L - take_unit<L>(lane, static_cast<std::uint32_t>(g.below(remaining[c]))));
            std::memcpy(at, lane, sizeof lane);
            --remaining[c];
        }
    }
#else
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint32_t c = id.empty() ? 0 : id[i];
        std::uint32_t* lane = cum + static_cast<std::size_t>(c) * L;
        const auto u = static_cast<std::uint32_t>(g.below(remaining[c]));
        std::uint32_t above = 0;
        for (std::size_t j = 0; j < L; ++j) {
            const std::uint32_t m = lane[j] > u ? 1u : 0u;
            lane[j] -= m;
            above += m;
        }
        label[i] = static_cast<Lab>(L - above);
        --remaining[c];
    }
#endif
    gen = g;
}

/// Row-order capacity draw. cap is S x k (row c = stratum c's capacities); id gives each
/// row's stratum (empty: one stratum). Writes bin numbers to label.
template <class L>
void capacity_assign(rng& g, std::span<const std::uint32_t> id, const std::uint32_t* cap, std::size_t strata_count,
                     std::size_t k, std::uint64_t* remaining, std::size_t n, L* label,
                     std::vector<std::uint32_t>& buffer) {
    switch ((k + 3) / 4) { // lanes: k rounded up to a multiple of 4 (one SSE2 vector)
    case 1:
        return capacity_assign_lanes<4>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 2:
        return capacity_assign_lanes<8>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 3:
        return capacity_assign_lanes<12>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 4:
        return capacity_assign_lanes<16>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 5:
        return capacity_assign_lanes<20>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 6:
        return capacity_assign_lanes<24>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 7:
        return capacity_assign_lanes<28>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    case 8:
        return capacity_assign_lanes<32>(g, id, cap, strata_count, k, remaining, n, label, buffer);
    default:
        break;
    }
    std::vector<capacity_tree> trees(strata_count);
    for (std::size_t c = 0; c < strata_count; ++c)
        trees[c].build(cap + c * k, k);
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint32_t c = id.empty() ? 0 : id[i];
        const std::size_t f = trees[c].take(g.below(remaining[c]));
        label[i] = static_cast<L>(f);
        --remaining[c];
    }
}

/// Test = rows labelled f, train = the others, both ascending; one branch-free pass.
template <class L>
void scan_fold(const L* label, std::size_t n, L f, std::size_t* train, std::size_t* test) noexcept {
    std::size_t a = 0, b = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const bool t = label[i] == f;
        test[b] = i;
        train[a] = i;
        b += t;
        a += !t;
    }
}

/// Groups in the order they are placed: shuffled, then stably sorted by size, largest first.
inline void group_order(rng& g, std::span<const std::size_t> sizes, std::vector<std::uint32_t>& order) {
    order.resize(sizes.size());
    for (std::size_t j = 0; j < order.size(); ++j)
        order[j] = static_cast<std::uint32_t>(j);
    shuffle(std::span<std::uint32_t>(order), g);
    std::stable_sort(order.begin(), order.end(), [&](std::uint32_t a, std::uint32_t b) { return sizes[a] > sizes[b]; });
}

/// Plan data of the k-fold family (kfold, repeated_kfold, five_by_two).
class kfold_engine {
public:
    kfold_engine(std::string_view who, std::size_t n, std::size_t k, std::size_t repeats, std::uint64_t seed,
                 std::optional<strata> st, std::optional<groups> gr)
        : who_(who), n_(n), k_(k), repeats_(repeats), seed_(seed), strata_(std::move(st)), groups_(std::move(gr)) {
        if (strata_ && groups_)
            check_same_size(who_, "groups", strata_->rows(), groups_->rows(), "strata");
        check_plan_rows(who_, "n", n_);
        if (k_ < 2)
            fail(who_, "folds", "must be at least 2, got " + std::to_string(k_));
        if (k_ > n_)
            fail(who_, "folds", std::to_string(k_) + " folds exceed the " + std::to_string(n_) + " rows");
        if (repeats_ == 0)
            fail(who_, "repeats", "must be at least 1");
        if (groups_) {
            if (groups_->count() < k_)
                fail(who_, "groups",
                     std::to_string(groups_->count()) + " groups, fewer than the " + std::to_string(k_) + " folds");
            const std::size_t hold = (n_ + k_ - 1) / k_;
            const auto sz = groups_->sizes();
            for (std::size_t j = 0; j < sz.size(); ++j)
                if (sz[j] > hold)
                    fail(who_, "groups",
                         groups_->describe(j) + " has " + std::to_string(sz[j]) +
                             " rows, more than a fold can hold (ceil(" + std::to_string(n_) + " / " +
                             std::to_string(k_) + ") = " + std::to_string(hold) + "); use fewer folds");
            if (strata_)
                build_histograms();
        } else {
            const std::size_t S = strata_ ? strata_->count() : 1;
            caps_.assign(S * k_, 0);
            fold_rows_.assign(k_, 0);
            std::size_t offset = 0;
            for (std::size_t c = 0; c < S; ++c) {
                const std::size_t nc = strata_ ? strata_->sizes()[c] : n_;
                if (strata_ && nc < k_)
                    fail(who_, "strata",
                         strata_->describe(c) + " has " + std::to_string(nc) + " rows, fewer than the " +
                             std::to_string(k_) + " folds");
                const std::size_t base = nc / k_, extra = nc % k_;
                for (std::size_t f = 0; f < k_; ++f) {
                    const std::size_t cap = base + (((f + k_ - offset) % k_) < extra ? 1 : 0);
                    caps_[c * k_ + f] = static_cast<std::uint32_t>(cap);
                    fold_rows_[f] += cap;
                }
                offset = (offset + nc) % k_;
            }
        }
    }

    std::string_view name() const noexcept { return who_; }
    std::size_t size() const noexcept { return repeats_ * k_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return repeats_; }
    std::size_t folds() const noexcept { return k_; }
    bool partitions() const noexcept { return true; }
    std::uint64_t seed() const noexcept { return seed_; }
    const std::optional<strata>& strata_data() const noexcept { return strata_; }
    const std::optional<groups>& groups_data() const noexcept { return groups_; }

    void make(std::size_t i, workspace& w) const {
        const std::size_t r = i / k_, f = i % k_;
        if (w.cached_repeat != r) {
            w.cached_repeat = no_index;
            if (k_ <= 256)
                assign(r, w, w.label8);
            else
                assign(r, w, w.label32);
            w.cached_repeat = r;
        }
        const std::size_t ntest = w.fold_rows[f];
        w.size_buffers(n_ - ntest, ntest);
        if (k_ <= 256)
            scan_fold(w.label8.data(), n_, static_cast<std::uint8_t>(f), w.train.data(), w.test.data());
        else
            scan_fold(w.label32.data(), n_, static_cast<std::uint32_t>(f), w.train.data(), w.test.data());
        w.repeat = r;
        w.fold = f;
        w.has_counts = false;
    }

    void check(const split& s, workspace& w) const {
        if (groups_)
            check_split_groups(who_, s, *groups_, w.mark);
    }

    /// The fold of every row in repeat r (for tests, tools and the golden pin).
    std::vector<std::uint32_t> assignment(std::size_t r) const {
        workspace w;
        std::vector<std::uint32_t> out(n_);
        if (k_ <= 256) {
            assign(r, w, w.label8);
            std::copy(w.label8.begin(), w.label8.begin() + static_cast<std::ptrdiff_t>(n_), out.begin());
        } else {
            assign(r, w, w.label32);
            out = w.label32;
        }
        return out;
    }

private:
    template <class L>
    void assign(std::size_t r, workspace& w, std::vector<L>& label) const {
        rng g(seed_, r);
        label.resize(n_);
        if (!groups_) {
            const std::size_t S = strata_ ? strata_->count() : 1;
            w.scratch_c.resize(S);
            for (std::size_t c = 0; c < S; ++c)
                w.scratch_c[c] = strata_ ? strata_->sizes()[c] : n_;
            capacity_assign(g, strata_ ? strata_->ids() : std::span<const std::uint32_t>(), caps_.data(), S, k_,
                            w.scratch_c.data(), n_, label.data(), w.scratch_a);
            w.fold_rows.assign(fold_rows_.begin(), fold_rows_.end());
        } else {
            const auto sizes = groups_->sizes();
            group_order(g, sizes, w.scratch_a);
            std::vector<std::uint32_t>& fold_of = w.scratch_b;
            fold_of.resize(sizes.size());
            w.fold_rows.assign(k_, 0);
            if (!strata_) {
                for (std::uint32_t grp : w.scratch_a) {
                    std::size_t best = 0;
                    for (std::size_t f = 1; f < k_; ++f)
                        if (w.fold_rows[f] < w.fold_rows[best])
                            best = f;
                    fold_of[grp] = static_cast<std::uint32_t>(best);
                    w.fold_rows[best] += sizes[grp];
                }
            } else {
                const std::size_t C = strata_->count();
                std::vector<std::uint64_t>& cnt = w.scratch_c; // k x C class counts per fold
                cnt.assign(k_ * C, 0);
                for (std::uint32_t grp : w.scratch_a) {
                    std::size_t best = 0;
                    std::uint64_t best_cost = 0;
                    for (std::size_t f = 0; f < k_; ++f) {
                        std::uint64_t cost = 0;
                        for (std::size_t h = hist_begin_[grp]; h < hist_begin_[grp + 1]; ++h)
                            cost += static_cast<std::uint64_t>(hist_count_[h]) * cnt[f * C + hist_class_[h]];
                        if (f == 0 || cost < best_cost || (cost == best_cost && w.fold_rows[f] < w.fold_rows[best])) {
                            best = f;
                            best_cost = cost;
                        }
                    }
                    fold_of[grp] = static_cast<std::uint32_t>(best);
                    w.fold_rows[best] += sizes[grp];
                    for (std::size_t h = hist_begin_[grp]; h < hist_begin_[grp + 1]; ++h)
                        cnt[best * C + hist_class_[h]] += hist_count_[h];
                }
            }
            const auto gid = groups_->ids();
            for (std::size_t i = 0; i < n_; ++i)
                label[i] = static_cast<L>(fold_of[gid[i]]);
        }
#ifndef NDEBUG
        // Each row has exactly one fold; the fold sizes are the ones promised.
        std::vector<std::size_t> seen(k_, 0);
        for (std::size_t i = 0; i < n_; ++i)
            ++seen[label[i]];
        HELDOUT_ASSERT(seen == w.fold_rows);
#endif
    }

    void build_histograms() {
        // (group, class) counts as compressed rows: hist_begin_[g] .. hist_begin_[g+1].
        const auto gid = groups_->ids();
        const auto cid = strata_->ids();
        const std::size_t G = groups_->count(), C = strata_->count();
        std::vector<std::size_t> start(G + 1, 0);
        for (std::size_t i = 0; i < n_; ++i)
            ++start[gid[i] + 1];
        for (std::size_t j = 0; j < G; ++j)
            start[j + 1] += start[j];
        std::vector<std::uint32_t> by_group(n_);
        {
            std::vector<std::size_t> pos(start.begin(), start.end() - 1);
            for (std::size_t i = 0; i < n_; ++i)
                by_group[pos[gid[i]]++] = static_cast<std::uint32_t>(i);
        }
        std::vector<std::uint32_t> tally(C, 0);
        std::vector<std::uint32_t> touched;
        hist_begin_.assign(1, 0);
        for (std::size_t j = 0; j < G; ++j) {
            touched.clear();
            for (std::size_t p = start[j]; p < start[j + 1]; ++p) {
                const std::uint32_t c = cid[by_group[p]];
                if (tally[c]++ == 0)
                    touched.push_back(c);
            }
            std::sort(touched.begin(), touched.end());
            for (std::uint32_t c : touched) {
                hist_class_.push_back(c);
                hist_count_.push_back(tally[c]);
                tally[c] = 0;
            }
            hist_begin_.push_back(hist_class_.size());
        }
    }

    std::string_view who_;
    std::size_t n_ = 0, k_ = 0, repeats_ = 1;
    std::uint64_t seed_ = 0;
    std::optional<strata> strata_;
    std::optional<groups> groups_;
    std::vector<std::uint32_t> caps_;     // S x k capacities (no groups)
    std::vector<std::size_t> fold_rows_;  // rows per fold (no groups)
    std::vector<std::size_t> hist_begin_; // strata + groups
    std::vector<std::uint32_t> hist_class_, hist_count_;
};

} // namespace detail

/// k-fold cross-validation: k splits, each row tested exactly once.
struct kfold {
    std::size_t folds = 10;
    std::uint64_t seed = 0;

    using range = split_range<detail::kfold_engine>;
    static constexpr std::string_view name = "heldout::kfold";

    range splits(std::size_t n) const { return range({name, n, folds, 1, seed, std::nullopt, std::nullopt}); }
    range splits(strata s) const { return range({name, s.rows(), folds, 1, seed, std::move(s), std::nullopt}); }
    range splits(groups g) const { return range({name, g.rows(), folds, 1, seed, std::nullopt, std::move(g)}); }
    /// Stratified and grouped, best effort (see the header comment).
    range splits(strata s, groups g) const {
        return range({name, s.rows(), folds, 1, seed, std::move(s), std::move(g)});
    }
};

HELDOUT_NAMESPACE_END
