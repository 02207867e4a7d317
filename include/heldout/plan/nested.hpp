// heldout/plan/nested.hpp — nested resampling: an inner plan run inside each outer training
// set (model selection inside, assessment outside), inner rows given as original row numbers.
//
//   auto r = heldout::nested{heldout::kfold{.folds = 5, .seed = 1}, heldout::kfold{.folds = 3, .seed = 2}}
//                .splits(heldout::strata(y));
//   for (const heldout::split& outer : r) {
//       for (const heldout::split& s : r.inner(outer.index)) tune(s.train, s.test);  // rows within outer.train
//       assess(outer.train, outer.test);
//   }
//
// Written with designated initialisers it needs the template arguments on clang 14
// (no aggregate deduction there): heldout::nested<heldout::kfold, heldout::kfold>{.outer = ..., .inner = ...};
// the positional form heldout::nested{outer, inner} deduces on every compiler.
// The inner plan sees the outer training rows as rows 0..m-1 in ascending order (with the
// strata/groups/intervals of those rows, renumbered; an inner plan that does not take that
// structure gets the row count) and its splits are mapped back to original row numbers, so
// inner train and test lie inside the outer training set and never touch the outer test.
// Inner bootstrap counts are indexed by original row (size n, zero outside). An outer
// bootstrap is refused at compile time: its duplicated rows would fall on both inner sides.
// An inner plan that cannot be built inside some outer training set is refused by inner(i)
// (input_error "heldout::nested: argument 'inner': cannot be built inside outer split i ...",
// followed by the inner plan's own message), so no inner split is ever empty on either side
// where the plan itself forbids it.
#pragma once

#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/range.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// An inner plan's engine on positions 0..m-1, with rows mapped to original numbers.
template <class Engine>
class mapped_engine {
public:
    mapped_engine(Engine e, std::vector<std::size_t> map, std::size_t n)
        : e_(std::move(e)), map_(std::move(map)), n_(n) {}

    std::string_view name() const noexcept { return e_.name(); }
    std::size_t size() const noexcept { return e_.size(); }
    std::size_t rows() const noexcept { return n_; }
    std::size_t repeats() const noexcept { return e_.repeats(); }
    std::size_t folds() const noexcept { return e_.folds(); }
    bool partitions() const noexcept { return false; } // only the outer training rows are tested
    /// The rows the inner plan works on (the outer training set), ascending.
    std::span<const std::size_t> inner_rows() const noexcept { return map_; }

    void make(std::size_t i, workspace& w) const {
        e_.make(i, w);
        for (std::size_t j = 0; j < w.train_size; ++j)
            w.train[j] = map_[w.train[j]];
        for (std::size_t j = 0; j < w.test_size; ++j)
            w.test[j] = map_[w.test[j]];
        if (w.has_counts) {
            w.scratch_a.assign(w.counts.begin(), w.counts.end());
            w.counts.assign(n_, 0);
            for (std::size_t p = 0; p < map_.size(); ++p)
                w.counts[map_[p]] = w.scratch_a[p];
        }
    }

    void check(const split& s, workspace&) const {
        // Inner rows stay inside the outer training set (map_ is ascending).
        auto inside = [&](std::size_t r) { return std::binary_search(map_.begin(), map_.end(), r); };
        for (std::size_t r : s.train)
            if (!inside(r))
                fail(e_.name(), "split",
                     split_label(s) + ": inner train row " + std::to_string(r) + " is outside the outer training set");
        for (std::size_t r : s.test)
            if (!inside(r))
                fail(e_.name(), "split",
                     split_label(s) + ": inner test row " + std::to_string(r) + " is outside the outer training set");
    }

private:
    Engine e_;
    std::vector<std::size_t> map_;
    std::size_t n_;
};

template <class R>
struct engine_of;
template <class E>
struct engine_of<split_range<E>> {
    using type = E;
};

} // namespace detail

/// The range of heldout::nested: the outer splits, plus inner(i) for outer split i.
template <class Outer, class Inner, class Data>
class nested_range {
public:
    /// The inner plan on m rows with their structure, when it takes that structure.
    static auto inner_splits(const Inner& p, const Data& d, std::span<const std::size_t> rows) {
        if constexpr (std::is_same_v<Data, std::size_t>)
            return p.splits(rows.size());
        else if constexpr (requires { p.splits(d.subset(rows)); })
            return p.splits(d.subset(rows));
        else
            return p.splits(rows.size());
    }

    using outer_range = decltype(std::declval<const Outer&>().splits(std::declval<Data>()));
    using inner_engine = typename detail::engine_of<decltype(inner_splits(
        std::declval<const Inner&>(), std::declval<const Data&>(), std::span<const std::size_t>()))>::type;
    using inner_range = split_range<detail::mapped_engine<inner_engine>>;

    nested_range(const Outer& outer, const Inner& inner, Data data)
        : outer_(outer.splits(data)), inner_(inner), data_(std::move(data)) {}

    std::size_t size() const noexcept { return outer_.size(); }
    std::size_t rows() const noexcept { return outer_.rows(); }
    std::size_t repeats() const noexcept { return outer_.repeats(); }
    std::size_t folds() const noexcept { return outer_.folds(); }
    bool partitions() const noexcept { return outer_.partitions(); }
    std::string_view name() const noexcept { return outer_.name(); }

    /// Outer split i.
    const heldout::split& split(std::size_t i) { return outer_.split(i); }
    auto begin() { return outer_.begin(); }
    auto end() { return outer_.end(); }
    auto cursor() const { return outer_.cursor(); }
    /// The outer splits alone.
    outer_range& outer() noexcept { return outer_; }

    /// The inner plan's splits inside outer split i's training rows (original row numbers).
    /// An inner plan that cannot be built on those rows (too few rows, groups or class rows
    /// for its folds, ...) is refused here, naming the outer split and the inner plan's reason.
    inner_range inner(std::size_t i) const {
        auto c = outer_.cursor();
        const heldout::split& o = c.split(i);
        std::vector<std::size_t> map(o.train.begin(), o.train.end());
        std::optional<inner_engine> e;
        try {
            e.emplace(inner_splits(inner_, data_, map).engine());
        } catch (const input_error& err) {
            detail::fail("heldout::nested", "inner",
                         "cannot be built inside outer " + detail::split_label(o) + ", which trains on " +
                             std::to_string(map.size()) + " rows: " + err.what());
        }
        return inner_range(detail::mapped_engine<inner_engine>(std::move(*e), std::move(map), rows()));
    }

private:
    outer_range outer_;
    Inner inner_;
    Data data_;
};

/// Nested resampling: `inner` runs inside every training set of `outer`.
template <class Outer, class Inner>
struct nested {
    Outer outer;
    Inner inner;

    static_assert(!std::is_same_v<Outer, bootstrap>,
                  "heldout::nested: a bootstrap outer plan repeats rows, which would fall on both inner sides");

    auto splits(std::size_t n) const { return nested_range<Outer, Inner, std::size_t>(outer, inner, n); }
    auto splits(strata s) const { return nested_range<Outer, Inner, strata>(outer, inner, std::move(s)); }
    auto splits(groups g) const { return nested_range<Outer, Inner, groups>(outer, inner, std::move(g)); }
    template <class T>
    auto splits(intervals<T> iv) const {
        return nested_range<Outer, Inner, intervals<T>>(outer, inner, std::move(iv));
    }
};

template <class Outer, class Inner>
nested(Outer, Inner) -> nested<Outer, Inner>;

HELDOUT_NAMESPACE_END
