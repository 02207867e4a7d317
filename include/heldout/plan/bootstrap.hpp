// heldout/plan/bootstrap.hpp — bootstrap resampling: train = n draws with replacement
// (duplicates kept), test = the out-of-bag rows (never drawn).
//
//   for (const heldout::split& s : heldout::bootstrap{.replicates = 200, .seed = 1}.splits(n)) {
//       fit(s.train);           // ascending, row r repeated s.counts[r] times
//       score(s.test);          // out-of-bag rows, ascending (may be empty for tiny n)
//   }
//
// The draw, exactly (frozen): replicate b uses heldout::rng(seed, b).
//  * Plain: n draws rng.below(n); counts[r] = times row r was drawn.
//  * Stratified (heldout::strata): strata in ascending order, stratum c draws n_c times
//    rng.below(n_c) among its own rows (in row order), so every class keeps its size.
//  * Grouped (heldout::groups, the cluster bootstrap): G draws rng.below(G) of whole groups;
//    each row counts as often as its group was drawn; test = rows of groups never drawn.
// s.counts has size n; s.train lists the rows ascending with their multiplicity (grouped:
// its length is the drawn groups' total size). The out-of-bag share of a plain replicate
// has expectation (1 - 1/n)^n -> e^-1 = 0.3679 (common practice); a replicate whose
// out-of-bag set is empty is kept (its test span is empty) rather than redrawn, so the
// sampling stays the textbook one: callers skip it. Needs at least 2 rows (2 groups).
// s.repeat = b, s.fold = 0.
#pragma once

#include <heldout/core/random.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

class bootstrap_engine {
public:
    bootstrap_engine(std::string_view who, std::size_t n, std::size_t replicates, std::uint64_t seed,
                     std::optional<strata> st, std::optional<groups> gr)
        : who_(who), n_(n), b_(replicates), seed_(seed), strata_(std::move(st)), groups_(std::move(gr)) {
        check_plan_rows(who_, "n", n_);
        if (b_ == 0)
            fail(who_, "replicates", "must be at least 1");
        if (n_ < 2)
            fail(who_, "n", "the bootstrap needs at least 2 rows");
        if (groups_ && groups_->count() < 2)
            fail(who_, "groups", "the grouped bootstrap needs at least 2 groups");
        if (strata_) {
            const auto id = strata_->ids();
            start_.assign(strata_->count() + 1, 0);
            for (std::size_t i = 0; i < n_; ++i)
                ++start_[id[i] + 1];
            for (std::size_t j = 0; j + 1 < start_.size(); ++j)
                start_[j + 1] += start_[j];
            by_stratum_.resize(n_);
            std::vector<std::size_t> pos(start_.begin(), start_.end() - 1);
            for (std::size_t i = 0; i < n_; ++i)
                by_stratum_[pos[id[i]]++] = static_cast<std::uint32_t>(i);
        }
    }

    std::string_view name() const noexcept { return who_; }
    std::size_t size() const noexcept { return b_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return b_; }
    std::size_t folds() const noexcept { return 1; }
    bool partitions() const noexcept { return false; }
    const std::optional<groups>& groups_data() const noexcept { return groups_; }

    void make(std::size_t i, workspace& w) const {
        rng g(seed_, i);
        w.repeat = i;
        w.fold = 0;
        w.has_counts = true;
        w.counts.assign(n_, 0);
        std::uint32_t* counts = w.counts.data();
        std::size_t drawn = n_;
        if (groups_) {
            const std::size_t G = groups_->count();
            std::vector<std::uint32_t>& gc = w.scratch_a;
            gc.assign(G, 0);
            for (std::size_t j = 0; j < G; ++j)
                ++gc[static_cast<std::size_t>(g.below(G))];
            const auto gid = groups_->ids();
            drawn = 0;
            for (std::size_t r = 0; r < n_; ++r) {
                counts[r] = gc[gid[r]];
                drawn += counts[r];
            }
        } else if (strata_) {
            for (std::size_t c = 0; c + 1 < start_.size(); ++c) {
                const std::size_t nc = start_[c + 1] - start_[c];
                const std::uint32_t* rows = by_stratum_.data() + start_[c];
                for (std::size_t j = 0; j < nc; ++j)
                    ++counts[rows[g.below(nc)]];
            }
        } else {
            for (std::size_t j = 0; j < n_; ++j)
                ++counts[static_cast<std::size_t>(g.below(n_))];
        }
        std::size_t oob = 0;
        for (std::size_t r = 0; r < n_; ++r)
            oob += counts[r] == 0;
        w.size_buffers(drawn, oob);
        std::size_t* train = w.train.data();
        std::size_t* test = w.test.data();
        std::size_t a = 0, b = 0;
        for (std::size_t r = 0; r < n_; ++r) {
            const std::uint32_t c = counts[r];
            test[b] = r;
            b += c == 0;
            for (std::uint32_t k = 0; k < c; ++k)
                train[a++] = r;
        }
    }

    void check(const split& s, workspace& w) const {
        if (groups_) // out-of-bag rows belong to groups never drawn
            check_split_groups(who_, s, *groups_, w.mark);
    }

private:
    std::string_view who_;
    std::size_t n_ = 0, b_ = 0;
    std::uint64_t seed_ = 0;
    std::optional<strata> strata_;
    std::optional<groups> groups_;
    std::vector<std::size_t> start_;
    std::vector<std::uint32_t> by_stratum_;
};

} // namespace detail

/// Bootstrap: `replicates` samples of n draws with replacement, tested out of bag.
struct bootstrap {
    std::size_t replicates = 200;
    std::uint64_t seed = 0;

    using range = split_range<detail::bootstrap_engine>;
    static constexpr std::string_view name = "heldout::bootstrap";

    range splits(std::size_t n) const { return range({name, n, replicates, seed, std::nullopt, std::nullopt}); }
    range splits(strata s) const { return range({name, s.rows(), replicates, seed, std::move(s), std::nullopt}); }
    range splits(groups g) const { return range({name, g.rows(), replicates, seed, std::nullopt, std::move(g)}); }
};

HELDOUT_NAMESPACE_END
