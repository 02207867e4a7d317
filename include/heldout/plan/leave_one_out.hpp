// heldout/plan/leave_one_out.hpp — leave-one-out: n splits, each testing one row; with
// groups, leave-one-group-out: one split per group.
//
//   for (const heldout::split& s : heldout::leave_one_out{}.splits(n)) { /* s.test = {s.fold} */ }
//   heldout::leave_one_out{}.splits(heldout::groups(site));   // split g tests group g
//
// No randomness. Split i tests row i (or dense group i, groups numbered by ascending id);
// train = every other row, ascending; s.repeat = 0, s.fold = i. Needs at least 2 rows
// (2 groups). Leave-one-out with strata is not offered: a single test row has one class.
#pragma once

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

class leave_one_out_engine {
public:
    leave_one_out_engine(std::string_view who, std::size_t n, std::optional<groups> gr)
        : who_(who), n_(n), groups_(std::move(gr)) {
        check_plan_rows(who_, "n", n_);
        if (groups_) {
            if (groups_->count() < 2)
                fail(who_, "groups", "leave-one-group-out needs at least 2 groups");
            // Rows of each group, ascending: by_group_[start_[g] .. start_[g+1]).
            const auto gid = groups_->ids();
            start_.assign(groups_->count() + 1, 0);
            for (std::size_t i = 0; i < n_; ++i)
                ++start_[gid[i] + 1];
            for (std::size_t j = 0; j + 1 < start_.size(); ++j)
                start_[j + 1] += start_[j];
            by_group_.resize(n_);
            std::vector<std::size_t> pos(start_.begin(), start_.end() - 1);
            for (std::size_t i = 0; i < n_; ++i)
                by_group_[pos[gid[i]]++] = i;
        } else if (n_ < 2) {
            fail(who_, "n", "leave-one-out needs at least 2 rows");
        }
    }

    std::string_view name() const noexcept { return who_; }
    std::size_t size() const noexcept { return groups_ ? groups_->count() : n_; }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return 1; }
    std::size_t folds() const noexcept { return size(); }
    bool partitions() const noexcept { return true; }
    /// Leave-one-group-out too: the test sets are fixed by the rows (groups), not drawn at random.
    split_design design() const noexcept { return split_design::leave_one_out; }

    void make(std::size_t i, workspace& w) const {
        w.repeat = 0;
        w.fold = i;
        w.has_counts = false;
        if (!groups_) {
            w.size_buffers(n_ - 1, 1);
            w.test[0] = i;
            for (std::size_t r = 0, a = 0; r < n_; ++r)
                if (r != i)
                    w.train[a++] = r;
            return;
        }
        const std::size_t nt = start_[i + 1] - start_[i];
        w.size_buffers(n_ - nt, nt);
        std::copy(by_group_.begin() + static_cast<std::ptrdiff_t>(start_[i]),
                  by_group_.begin() + static_cast<std::ptrdiff_t>(start_[i + 1]), w.test.begin());
        const auto gid = groups_->ids();
        std::size_t a = 0;
        for (std::size_t r = 0; r < n_; ++r) {
            w.train[a] = r;
            a += gid[r] != i;
        }
    }

    void check(const split& s, workspace& w) const {
        if (groups_)
            check_split_groups(who_, s, *groups_, w.mark);
    }

private:
    std::string_view who_;
    std::size_t n_ = 0;
    std::optional<groups> groups_;
    std::vector<std::size_t> start_, by_group_;
};

} // namespace detail

/// Leave-one-out (leave-one-group-out with groups).
struct leave_one_out {
    using range = split_range<detail::leave_one_out_engine>;
    static constexpr std::string_view name = "heldout::leave_one_out";

    range splits(std::size_t n) const { return range({name, n, std::nullopt}); }
    range splits(groups g) const { return range({name, g.rows(), std::move(g)}); }
};

HELDOUT_NAMESPACE_END
