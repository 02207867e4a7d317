// heldout/plan/range.hpp — the range every plan's splits(...) returns, its cursors for
// parallel loops, and the concepts split_source and split_plan.
//
//   auto r = heldout::kfold{.folds = 5, .seed = 7}.splits(n);   // owns what it needs
//   for (const heldout::split& s : r) { fit(s.train); score(s.test); }
//   const heldout::split& third = r.split(2);                   // random access
//   r.size();                        // number of splits (r.repeats() * r.folds())
//   // parallel: one cursor per thread; each has its own buffers, the plan data are shared
//   std::thread t([c = r.cursor()]() mutable { for (std::size_t i = 1; i < c.size(); i += 2) use(c.split(i)); });
//   std::vector<heldout::owned_split> all = r.to_vector();      // keep them all
//
// Laziness: a split is built when asked for, into buffers owned by the range (or cursor)
// and reused, so after the first split no allocation happens per split. A split's spans
// stay valid until the same range/cursor builds another split. Plans that assign rows to
// folds compute one repeat's assignment (one byte per row up to 256 folds) when a split
// of that repeat is first asked for, and keep it for the repeat's other folds.
//
// In debug builds (!NDEBUG) every split built is checked: rows in range, test ascending
// without duplicates, train ascending, train and test disjoint (bootstrap aside), and the
// plan's own guards (groups, time order, purging); see heldout/plan/check.hpp.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/split.hpp>
#include <heldout/plan/structure.hpp>

#include <algorithm>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <iterator>
#include <memory>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

inline constexpr std::size_t no_index = static_cast<std::size_t>(-1);

/// Buffers of one cursor, reused from split to split. train/test keep one slot of slack:
/// the branch-free scans write one element past the last kept one.
struct workspace {
    std::vector<std::size_t> train, test;
    std::vector<std::uint32_t> counts;
    std::vector<std::uint8_t> label8;   // fold of each row (folds <= 256)
    std::vector<std::uint32_t> label32; // fold of each row (more folds)
    std::vector<std::size_t> fold_rows; // rows per fold of the cached repeat
    std::vector<std::uint32_t> scratch_a, scratch_b;
    std::vector<std::uint64_t> scratch_c;
    std::vector<std::uint8_t> mark; // debug checks
    std::size_t cached_repeat = no_index;
    std::size_t train_size = 0, test_size = 0;
    std::size_t repeat = 0, fold = 0;
    bool has_counts = false;

    void size_buffers(std::size_t ntrain, std::size_t ntest) {
        if (train.size() < ntrain + 1)
            train.resize(ntrain + 1);
        if (test.size() < ntest + 1)
            test.resize(ntest + 1);
        train_size = ntrain;
        test_size = ntest;
    }
};

inline std::string split_label(const split& s) {
    return "split " + std::to_string(s.index) + " (repeat " + std::to_string(s.repeat) + ", fold " +
           std::to_string(s.fold) + ")";
}

/// The checks every split passes: rows < n, test ascending and unique, train ascending,
/// disjoint unless the split carries bootstrap counts (then counts match train).
inline void check_split_basic(std::string_view who, const split& s, std::size_t n, std::vector<std::uint8_t>& mark) {
    const std::string where = split_label(s);
    for (std::size_t j = 0; j < s.test.size(); ++j) {
        if (s.test[j] >= n)
            fail_at(who, "split",
                    where + ": test row " + std::to_string(s.test[j]) + " outside 0.." + std::to_string(n - 1), j);
        if (j > 0 && s.test[j] <= s.test[j - 1])
            fail_at(who, "split", where + ": test rows not strictly ascending", j);
    }
    for (std::size_t j = 0; j < s.train.size(); ++j) {
        if (s.train[j] >= n)
            fail_at(who, "split",
                    where + ": train row " + std::to_string(s.train[j]) + " outside 0.." + std::to_string(n - 1), j);
        if (j > 0 && s.train[j] < s.train[j - 1])
            fail_at(who, "split", where + ": train rows not ascending", j);
        if (s.counts.empty() && j > 0 && s.train[j] == s.train[j - 1])
            fail_at(who, "split", where + ": train row " + std::to_string(s.train[j]) + " repeated", j);
    }
    if (mark.size() < n) // all zero on entry and on exit
        mark.resize(n, 0);
    for (std::size_t r : s.test)
        mark[r] = 1;
    std::size_t bad = no_index, bad_j = 0;
    if (s.counts.empty()) {
        for (std::size_t j = 0; j < s.train.size() && bad == no_index; ++j)
            if (mark[s.train[j]]) {
                bad = s.train[j];
                bad_j = j;
            }
    }
    for (std::size_t r : s.test)
        mark[r] = 0;
    if (bad != no_index)
        fail_at(who, "split", where + ": row " + std::to_string(bad) + " is in both train and test", bad_j);
    if (!s.counts.empty()) {
        if (s.counts.size() != n)
            fail(who, "split",
                 where + ": counts has size " + std::to_string(s.counts.size()) + ", not " + std::to_string(n));
        std::size_t j = 0;
        for (std::size_t r = 0; r < n; ++r) {
            for (std::uint32_t c = 0; c < s.counts[r]; ++c, ++j)
                if (j >= s.train.size() || s.train[j] != r)
                    fail(who, "split", where + ": counts disagree with the train rows at row " + std::to_string(r));
        }
        if (j != s.train.size())
            fail(who, "split",
                 where + ": counts sum to " + std::to_string(j) + ", not the " + std::to_string(s.train.size()) +
                     " train rows");
        for (std::size_t t : s.test)
            if (s.counts[t] != 0)
                fail(who, "split", where + ": out-of-bag row " + std::to_string(t) + " was drawn");
    }
}

/// No group on both sides of a split. `mark` is all zero on entry and on exit.
inline void check_split_groups(std::string_view who, const split& s, const groups& g, std::vector<std::uint8_t>& mark) {
    const auto id = g.ids();
    if (mark.size() < g.count())
        mark.resize(g.count(), 0);
    for (std::size_t r : s.test)
        mark[id[r]] = 1;
    std::size_t bad = no_index;
    for (std::size_t j = 0; j < s.train.size() && bad == no_index; ++j)
        if (mark[id[s.train[j]]])
            bad = j;
    for (std::size_t r : s.test)
        mark[id[r]] = 0;
    if (bad != no_index)
        fail_at(who, "split",
                split_label(s) + ": " + g.describe(id[s.train[bad]]) + " is on both sides (train row " +
                    std::to_string(s.train[bad]) + ")",
                bad);
}

/// Every train row comes before every test row, with at least `gap` rows between them.
inline void check_split_time_order(std::string_view who, const split& s, std::size_t gap) {
    if (s.train.empty() || s.test.empty())
        return;
    std::size_t last_train = 0;
    for (std::size_t r : s.train)
        last_train = r > last_train ? r : last_train;
    std::size_t first_test = s.test[0];
    for (std::size_t r : s.test)
        first_test = r < first_test ? r : first_test;
    if (first_test <= last_train || first_test - last_train - 1 < gap)
        fail(who, "split",
             split_label(s) + ": time order broken: train row " + std::to_string(last_train) + " and test row " +
                 std::to_string(first_test) + " are not separated by " + std::to_string(gap) + " rows");
}

} // namespace detail

/// A source of splits: a range of const split& with a size, random access and the row count.
template <class R>
concept split_source = requires(R& r, const R& cr, std::size_t i) {
    { cr.size() } -> std::convertible_to<std::size_t>;
    { cr.rows() } -> std::convertible_to<std::size_t>;
    { r.split(i) } -> std::same_as<const split&>;
    r.begin();
    r.end();
};

/// A plan whose splits(data) gives a split_source; Data is a row count by default, or
/// heldout::strata / heldout::groups / heldout::intervals<T> where the plan takes them.
template <class P, class Data = std::size_t>
concept split_plan = std::copyable<P> && requires(const P& p, const Data& d) {
    { p.splits(d) } -> split_source;
};

/// One thread's access to a plan's splits: its own buffers, shared plan data.
template <class Engine>
class split_cursor {
public:
    explicit split_cursor(std::shared_ptr<const Engine> e) : e_(std::move(e)) {}
    // A copy starts with fresh buffers: the spans of a cached split point into the original's.
    split_cursor(const split_cursor& o) : e_(o.e_) {}
    split_cursor& operator=(const split_cursor& o) {
        if (this != &o) {
            e_ = o.e_;
            current_ = detail::no_index;
        }
        return *this;
    }
    split_cursor(split_cursor&& o) noexcept : e_(std::move(o.e_)), w_(std::move(o.w_)), s_(o.s_), current_(o.current_) {
        o.current_ = detail::no_index;
    }
    split_cursor& operator=(split_cursor&& o) noexcept {
        e_ = std::move(o.e_);
        w_ = std::move(o.w_);
        s_ = o.s_;
        current_ = o.current_;
        o.current_ = detail::no_index;
        return *this;
    }

    std::size_t size() const noexcept { return e_->size(); }
    std::size_t rows() const noexcept { return e_->rows(); }

    /// Split i (0 <= i < size()); valid until this cursor builds another split.
    const heldout::split& split(std::size_t i) {
        if (i >= e_->size())
            detail::fail(e_->name(), "i",
                         "split " + std::to_string(i) + " out of range: the plan has " + std::to_string(e_->size()) +
                             " splits");
        if (i != current_) {
            current_ = detail::no_index; // stays invalid if make() throws
            e_->make(i, w_);
            s_ = heldout::split{std::span<const std::size_t>(w_.train.data(), w_.train_size),
                                std::span<const std::size_t>(w_.test.data(), w_.test_size),
                                w_.repeat,
                                w_.fold,
                                i,
                                w_.has_counts ? std::span<const std::uint32_t>(w_.counts)
                                              : std::span<const std::uint32_t>()};
            // Plans that are not random draws say so; ci::automatic reads it (estimate/methods.hpp).
            if constexpr (requires(const Engine& e) { e.design(); })
                s_.design = e_->design();
#ifndef NDEBUG
            detail::check_split_basic(e_->name(), s_, e_->rows(), w_.mark);
            e_->check(s_, w_);
#endif
            current_ = i;
        }
        return s_;
    }

private:
    std::shared_ptr<const Engine> e_;
    detail::workspace w_;
    heldout::split s_{};
    std::size_t current_ = detail::no_index;
};

/// The range a plan's splits(...) returns. Owns copies of the plan and its data (strata,
/// groups, intervals), so it may be used after the arguments are gone.
template <class Engine>
class split_range {
public:
    /// Input iterator yielding const split&; dereferencing builds the split on demand.
    class iterator {
    public:
        using value_type = heldout::split;
        using reference = const heldout::split&;
        using difference_type = std::ptrdiff_t;
        using iterator_category = std::input_iterator_tag;
        using iterator_concept = std::input_iterator_tag;

        iterator() = default;
        iterator(split_cursor<Engine>* c, std::size_t i) : c_(c), i_(i) {}
        reference operator*() const { return c_->split(i_); }
        const heldout::split* operator->() const { return &c_->split(i_); }
        iterator& operator++() {
            ++i_;
            return *this;
        }
        void operator++(int) { ++i_; }
        friend bool operator==(const iterator& a, const iterator& b) noexcept { return a.i_ == b.i_; }

    private:
        split_cursor<Engine>* c_ = nullptr;
        std::size_t i_ = 0;
    };

    explicit split_range(Engine e) : e_(std::make_shared<const Engine>(std::move(e))), c_(e_) {}

    /// Number of splits.
    std::size_t size() const noexcept { return e_->size(); }
    /// Number of rows n of the data (row numbers are 0..n-1).
    std::size_t rows() const noexcept { return e_->rows(); }
    /// Repetitions (repeats of k-fold, bootstrap replicates, subsampling repeats; else 1).
    std::size_t repeats() const noexcept { return e_->repeats(); }
    /// Splits per repetition (folds; 1 for holdout, subsampling and bootstrap).
    std::size_t folds() const noexcept { return e_->folds(); }
    /// True when, in each repetition, every row is tested exactly once (k-fold family).
    bool partitions() const noexcept { return e_->partitions(); }
    /// The plan's name, as used in messages ("heldout::kfold").
    std::string_view name() const noexcept { return e_->name(); }
    /// The engine (plan data); for checks and tools.
    const Engine& engine() const noexcept { return *e_; }

    const heldout::split& split(std::size_t i) { return c_.split(i); }
    split_cursor<Engine> cursor() const { return split_cursor<Engine>(e_); }

    iterator begin() { return iterator(&c_, 0); }
    iterator end() { return iterator(&c_, e_->size()); }

    /// Every split, copied.
    std::vector<owned_split> to_vector() const {
        auto c = cursor();
        std::vector<owned_split> out;
        out.reserve(c.size());
        for (std::size_t i = 0; i < c.size(); ++i)
            out.emplace_back(c.split(i));
        return out;
    }

private:
    std::shared_ptr<const Engine> e_;
    split_cursor<Engine> c_;
};

HELDOUT_NAMESPACE_END
