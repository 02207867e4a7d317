// heldout/plan/holdout.hpp — one random train/test split (plain, stratified or grouped).
//
//   auto r = heldout::holdout{.test_fraction = 0.2, .seed = 1}.splits(n);
//   const heldout::split& s = r.split(0);           // the only split
//   heldout::holdout{.test_count = 1000}.splits(heldout::strata(y));   // class shares kept
//   heldout::holdout{.test_fraction = 0.3}.splits(heldout::groups(site));
//
// Test size: test_count rows when test_count > 0, else round(test_fraction * n) (half away
// from zero); test_fraction must lie in (0, 1) and the test size in 1..n-1.
// The draw, exactly (frozen): repeat r (holdout is repeat 0 of heldout::subsampling with the
// same members) uses heldout::rng(seed, r).
//  * Plain: rows in row order; with T test places and R rows left, u = rng.below(R) and the
//    row is tested when u < T (then T drops by one). Every test set of that size is equally
//    likely. Stratified: the same within each stratum, stratum c having t_c test places:
//    floor(t n_c / n) plus one for the strata with the largest remainders (t n_c mod n;
//    ties to the lower stratum) until the quotas sum to t, so each class's test share is
//    within one row of exact.
//  * Grouped: groups (numbered by ascending id) shuffled with heldout::shuffle; groups go to
//    the test side in that order until it holds at least t rows (it may hold more). A plan
//    where some draw could leave no training rows (t > n - largest group) is refused.
// Both sides ascending; s.repeat = s.fold = 0 for holdout.
#pragma once

#include <heldout/core/random.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// Plan data of holdout and subsampling.
class holdout_engine {
public:
    holdout_engine(std::string_view who, std::size_t n, std::size_t repeats, double test_fraction,
                   std::size_t test_count, std::uint64_t seed, std::optional<strata> st, std::optional<groups> gr)
        : who_(who), n_(n), repeats_(repeats), seed_(seed), strata_(std::move(st)), groups_(std::move(gr)) {
        check_plan_rows(who_, "n", n_);
        if (repeats_ == 0)
            fail(who_, "repeats", "must be at least 1");
        if (n_ < 2)
            fail(who_, "n", "a train/test split needs at least 2 rows");
        if (test_count > 0) {
            if (test_count >= n_)
                fail(who_, "test_count",
                     std::to_string(test_count) + " test rows leave no training rows out of " + std::to_string(n_));
            t_ = test_count;
        } else {
            if (!(test_fraction > 0.0 && test_fraction < 1.0))
                fail(who_, "test_fraction", "must lie in (0, 1), got " + number_text(test_fraction));
            const double x = std::round(test_fraction * static_cast<double>(n_));
            t_ = static_cast<std::size_t>(x);
            if (t_ == 0)
                fail(who_, "test_fraction",
                     number_text(test_fraction) + " of " + std::to_string(n_) + " rows rounds to no test rows");
            if (t_ >= n_)
                fail(who_, "test_fraction",
                     number_text(test_fraction) + " of " + std::to_string(n_) + " rows leaves no training rows");
        }
        if (groups_) {
            if (groups_->count() < 2)
                fail(who_, "groups", "a grouped split needs at least 2 groups");
            const auto sz = groups_->sizes();
            const std::size_t big = static_cast<std::size_t>(std::max_element(sz.begin(), sz.end()) - sz.begin());
            if (t_ > n_ - sz[big])
                fail(who_, "groups",
                     groups_->describe(big) + " has " + std::to_string(sz[big]) + " rows: with " + std::to_string(t_) +
                         " test rows out of " + std::to_string(n_) + " a draw could leave no training rows");
            return;
        }
        const std::size_t S = strata_ ? strata_->count() : 1;
        caps_.assign(2 * S, 0);
        if (!strata_) {
            caps_[0] = static_cast<std::uint32_t>(t_);
            caps_[1] = static_cast<std::uint32_t>(n_ - t_);
            return;
        }
        // Largest-remainder quotas: t n_c < 2^64 because both are below 2^32.
        const auto sz = strata_->sizes();
        std::vector<std::uint64_t> rem(S);
        std::size_t given = 0;
        for (std::size_t c = 0; c < S; ++c) {
            const std::uint64_t prod = static_cast<std::uint64_t>(t_) * sz[c];
            caps_[2 * c] = static_cast<std::uint32_t>(prod / n_);
            rem[c] = prod % n_;
            given += caps_[2 * c];
        }
        std::vector<std::uint32_t> order(S);
        for (std::size_t c = 0; c < S; ++c)
            order[c] = static_cast<std::uint32_t>(c);
        std::stable_sort(order.begin(), order.end(), [&](std::uint32_t a, std::uint32_t b) { return rem[a] > rem[b]; });
        for (std::size_t j = 0; given < t_; ++j, ++given)
            ++caps_[2 * order[j]];
        for (std::size_t c = 0; c < S; ++c)
            caps_[2 * c + 1] = static_cast<std::uint32_t>(sz[c] - caps_[2 * c]);
    }

    std::string_view name() const noexcept { return who_; }
    std::size_t size() const noexcept { return repeats_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return repeats_; }
    std::size_t folds() const noexcept { return 1; }
    bool partitions() const noexcept { return false; }
    /// Test rows of each split (at least this many for grouped plans).
    std::size_t test_rows() const noexcept { return t_; }
    const std::optional<groups>& groups_data() const noexcept { return groups_; }

    void make(std::size_t i, workspace& w) const {
        rng g(seed_, i);
        w.repeat = i;
        w.fold = 0;
        w.has_counts = false;
        if (groups_) {
            const auto sizes = groups_->sizes();
            std::vector<std::uint32_t>& order = w.scratch_a;
            order.resize(sizes.size());
            for (std::size_t j = 0; j < order.size(); ++j)
                order[j] = static_cast<std::uint32_t>(j);
            shuffle(std::span<std::uint32_t>(order), g);
            std::vector<std::uint8_t>& in_test = w.label8;
            in_test.assign(sizes.size(), 0);
            std::size_t taken = 0;
            for (std::size_t j = 0; j < order.size() && taken < t_; ++j) {
                in_test[order[j]] = 1;
                taken += sizes[order[j]];
            }
            w.size_buffers(n_ - taken, taken);
            const auto gid = groups_->ids();
            std::size_t a = 0, b = 0;
            for (std::size_t r = 0; r < n_; ++r) {
                const bool t = in_test[gid[r]] != 0;
                w.test[b] = r;
                w.train[a] = r;
                b += t;
                a += !t;
            }
            return;
        }
        w.size_buffers(n_ - t_, t_);
        w.scratch_a.assign(caps_.begin(), caps_.end());
        std::uint32_t* cap = w.scratch_a.data();
        std::size_t* train = w.train.data();
        std::size_t* test = w.test.data();
        std::size_t a = 0, b = 0;
        if (!strata_) {
            std::uint64_t left = n_;
            for (std::size_t r = 0; r < n_; ++r, --left) {
                const bool t = g.below(left) < cap[0];
                cap[0] -= t;
                test[b] = r;
                train[a] = r;
                b += t;
                a += !t;
            }
        } else {
            const auto id = strata_->ids();
            const auto sz = strata_->sizes();
            std::vector<std::uint64_t>& left = w.scratch_c;
            left.assign(sz.begin(), sz.end());
            for (std::size_t r = 0; r < n_; ++r) {
                const std::uint32_t c = id[r];
                const bool t = g.below(left[c]) < cap[2 * c];
                cap[2 * c] -= t;
                --left[c];
                test[b] = r;
                train[a] = r;
                b += t;
                a += !t;
            }
        }
        HELDOUT_ASSERT(b == t_);
    }

    void check(const split& s, workspace& w) const {
        if (groups_)
            check_split_groups(who_, s, *groups_, w.mark);
    }

private:
    std::string_view who_;
    std::size_t n_ = 0, repeats_ = 1, t_ = 0;
    std::uint64_t seed_ = 0;
    std::optional<strata> strata_;
    std::optional<groups> groups_;
    std::vector<std::uint32_t> caps_; // per stratum: test places, train places
};

} // namespace detail

/// One random train/test split.
struct holdout {
    double test_fraction = 0.25;
    std::size_t test_count = 0; ///< when > 0, the test size in rows (test_fraction is then ignored)
    std::uint64_t seed = 0;

    using range = split_range<detail::holdout_engine>;
    static constexpr std::string_view name = "heldout::holdout";

    range splits(std::size_t n) const {
        return range({name, n, 1, test_fraction, test_count, seed, std::nullopt, std::nullopt});
    }
    range splits(strata s) const {
        return range({name, s.rows(), 1, test_fraction, test_count, seed, std::move(s), std::nullopt});
    }
    range splits(groups g) const {
        return range({name, g.rows(), 1, test_fraction, test_count, seed, std::nullopt, std::move(g)});
    }
};

HELDOUT_NAMESPACE_END
