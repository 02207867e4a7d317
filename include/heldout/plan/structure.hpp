// heldout/plan/structure.hpp — what a plan must respect in the data: classes (strata),
// entities that must not cross sides (groups), and label time intervals (for purging).
//
//   std::vector<int> y = ...;                    // class labels, any integral values
//   auto s = heldout::strata(y);                 // stratify by class
//   std::vector<double> target = ...;
//   auto b = heldout::strata(target, 5);         // continuous target: 5 quantile bins
//   std::vector<long> patient = ...;
//   auto g = heldout::groups(patient);           // no patient on both sides
//   auto iv = heldout::intervals(t0, t1);        // label of row i uses times [t0[i], t1[i]]
//   heldout::kfold{.folds = 5}.splits(s);        // plans take these in place of a row count
//
// Conventions (fixed; the pinned splits depend on them):
//  * strata(labels): stratum ids are dense, numbered by ascending label value.
//  * strata(values, bins): rows sorted by (value, row); a row's bin is
//    floor(r * bins / n), where r is the 0-based rank of the first row of its tie group,
//    so equal values always share a bin; empty bins are dropped and the rest renumbered.
//  * groups(ids): group ids are dense, numbered by ascending id value.
//  * At most 2^32 - 1 rows (ids and bootstrap counts are 32-bit).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <numeric>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

inline constexpr std::size_t max_plan_rows = std::numeric_limits<std::uint32_t>::max();

inline void check_plan_rows(std::string_view who, std::string_view arg, std::size_t n) {
    if (n == 0)
        fail(who, arg, "empty input (no rows)");
    if (n > max_plan_rows)
        fail(who, arg, std::to_string(n) + " rows, more than the 4294967295 a plan supports");
}

/// Dense ids 0..k-1 numbered by ascending value; keys[j] = the value of id j.
template <class T>
void dense_ids(std::span<const T> v, std::vector<std::uint32_t>& id, std::vector<long long>& keys,
               std::vector<std::size_t>& sizes) {
    const std::size_t n = v.size();
    id.assign(n, 0);
    keys.clear();
    sizes.clear();
    const auto [lo_it, hi_it] = std::minmax_element(v.begin(), v.end());
    const long long lo = static_cast<long long>(*lo_it);
    const unsigned long long span_width =
        static_cast<unsigned long long>(static_cast<long long>(*hi_it)) - static_cast<unsigned long long>(lo);
    if (span_width < (1ULL << 20) && span_width <= 4 * n) {
        // Narrow value range: count directly (linear time).
        std::vector<std::uint32_t> map(static_cast<std::size_t>(span_width) + 1, 0);
        for (std::size_t i = 0; i < n; ++i)
            map[static_cast<std::size_t>(static_cast<long long>(v[i]) - lo)] = 1;
        std::uint32_t next = 0;
        for (std::size_t j = 0; j < map.size(); ++j)
            if (map[j]) {
                map[j] = next++;
                keys.push_back(lo + static_cast<long long>(j));
            }
        sizes.assign(next, 0);
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint32_t d = map[static_cast<std::size_t>(static_cast<long long>(v[i]) - lo)];
            id[i] = d;
            ++sizes[d];
        }
        return;
    }
    std::vector<long long> distinct(n);
    for (std::size_t i = 0; i < n; ++i)
        distinct[i] = static_cast<long long>(v[i]);
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    sizes.assign(distinct.size(), 0);
    for (std::size_t i = 0; i < n; ++i) {
        const auto d = static_cast<std::uint32_t>(
            std::lower_bound(distinct.begin(), distinct.end(), static_cast<long long>(v[i])) - distinct.begin());
        id[i] = d;
        ++sizes[d];
    }
    keys = std::move(distinct);
}

/// Renumber ids of the rows listed in `rows` densely (ascending old id), dropping absent ids.
inline void subset_ids(std::span<const std::uint32_t> old_id, std::span<const long long> old_keys,
                       std::span<const std::size_t> rows, std::vector<std::uint32_t>& id, std::vector<long long>& keys,
                       std::vector<std::size_t>& sizes) {
    std::vector<std::uint32_t> map(old_keys.size(), 0);
    for (std::size_t r : rows)
        map[old_id[r]] = 1;
    keys.clear();
    std::uint32_t next = 0;
    for (std::size_t j = 0; j < map.size(); ++j)
        if (map[j]) {
            map[j] = next++;
            keys.push_back(old_keys[j]);
        }
    sizes.assign(next, 0);
    id.resize(rows.size());
    for (std::size_t i = 0; i < rows.size(); ++i) {
        id[i] = map[old_id[rows[i]]];
        ++sizes[id[i]];
    }
}

} // namespace detail

/// Class (or binned-target) membership of each row, for stratified plans.
class strata {
public:
    /// Strata by class label: any integral values (negative included).
    template <label_range L>
    explicit strata(const L& labels) {
        auto v = values_of(labels, "heldout::strata", "labels");
        detail::check_plan_rows("heldout::strata", "labels", v.size());
        detail::dense_ids(v, id_, keys_, sizes_);
    }

    /// Strata of a continuous target: `bins` quantile bins (ties kept together).
    template <real_range R>
    strata(const R& values, std::size_t bins) : binned_(true) {
        constexpr std::string_view who = "heldout::strata";
        auto v = values_of(values, who, "values");
        detail::check_plan_rows(who, "values", v.size());
        detail::check_finite(who, "values", v);
        const std::size_t n = v.size();
        if (bins == 0)
            detail::fail(who, "bins", "must be at least 1");
        if (bins > n)
            detail::fail(who, "bins", std::to_string(bins) + " bins exceed the " + std::to_string(n) + " rows");
        std::vector<std::uint32_t> order(n);
        std::iota(order.begin(), order.end(), std::uint32_t{0});
        // (value, row) is a total order, so the result does not depend on the sort's implementation.
        std::sort(order.begin(), order.end(),
                  [&](std::uint32_t a, std::uint32_t b) { return v[a] < v[b] || (v[a] == v[b] && a < b); });
        std::vector<std::uint32_t> bin(n);
        std::size_t first = 0;
        for (std::size_t r = 0; r < n; ++r) {
            if (r > 0 && v[order[r]] != v[order[r - 1]])
                first = r;
            // r < n and bins <= n < 2^32, so the product fits in 64 bits.
            bin[order[r]] = static_cast<std::uint32_t>(static_cast<std::uint64_t>(first) * bins / n);
        }
        detail::dense_ids(std::span<const std::uint32_t>(bin), id_, keys_, sizes_);
    }

    /// Number of rows.
    std::size_t rows() const noexcept { return id_.size(); }
    /// Number of strata.
    std::size_t count() const noexcept { return sizes_.size(); }
    /// Dense stratum of each row (0..count()-1).
    std::span<const std::uint32_t> ids() const noexcept { return id_; }
    /// Rows in each stratum.
    std::span<const std::size_t> sizes() const noexcept { return sizes_; }
    /// The label (or bin number) each stratum stands for.
    std::span<const long long> keys() const noexcept { return keys_; }
    /// True for strata(values, bins).
    bool binned() const noexcept { return binned_; }

    /// "stratum 2 (label 7)" for messages.
    std::string describe(std::size_t s) const {
        return "stratum " + std::to_string(s) + (binned_ ? " (bin " : " (label ") + std::to_string(keys_[s]) + ")";
    }

    /// The strata of the rows listed (positions become the new row numbers), renumbered densely.
    strata subset(std::span<const std::size_t> rows) const {
        strata s;
        s.binned_ = binned_;
        detail::subset_ids(id_, keys_, rows, s.id_, s.keys_, s.sizes_);
        return s;
    }

private:
    strata() = default;
    std::vector<std::uint32_t> id_;
    std::vector<long long> keys_;
    std::vector<std::size_t> sizes_;
    bool binned_ = false;
};

/// Entity membership of each row (patient, site, user...): a grouped plan never puts one
/// group on both sides of a split.
class groups {
public:
    template <label_range L>
    explicit groups(const L& ids) {
        auto v = values_of(ids, "heldout::groups", "ids");
        detail::check_plan_rows("heldout::groups", "ids", v.size());
        detail::dense_ids(v, id_, keys_, sizes_);
    }

    std::size_t rows() const noexcept { return id_.size(); }
    /// Number of groups.
    std::size_t count() const noexcept { return sizes_.size(); }
    /// Dense group of each row (0..count()-1).
    std::span<const std::uint32_t> ids() const noexcept { return id_; }
    std::span<const std::size_t> sizes() const noexcept { return sizes_; }
    /// The original id each dense group stands for.
    std::span<const long long> keys() const noexcept { return keys_; }

    std::string describe(std::size_t g) const {
        return "group " + std::to_string(g) + " (id " + std::to_string(keys_[g]) + ")";
    }

    groups subset(std::span<const std::size_t> rows) const {
        groups s;
        detail::subset_ids(id_, keys_, rows, s.id_, s.keys_, s.sizes_);
        return s;
    }

private:
    groups() = default;
    std::vector<std::uint32_t> id_;
    std::vector<long long> keys_;
    std::vector<std::size_t> sizes_;
};

/// Label intervals: the label of row i uses information from times t0[i] to t1[i]
/// (closed). Rows must be in time order: t0 non-decreasing, t1[i] >= t0[i].
template <class T>
class intervals {
    static_assert(std::is_arithmetic_v<T>, "heldout::intervals: times must be numbers");

public:
    template <value_range A, value_range B>
    intervals(const A& t0, const B& t1) {
        constexpr std::string_view who = "heldout::intervals";
        auto a = values_of(t0, who, "t0");
        auto b = values_of(t1, who, "t1");
        detail::check_plan_rows(who, "t0", a.size());
        detail::check_same_size(who, "t1", a.size(), b.size(), "t0");
        detail::check_finite(who, "t0", a);
        detail::check_finite(who, "t1", b);
        t0_.assign(a.begin(), a.end());
        t1_.assign(b.begin(), b.end());
        for (std::size_t i = 0; i < t0_.size(); ++i) {
            if (t1_[i] < t0_[i])
                detail::fail_at(who, "t1", "interval ends before it starts (t1 < t0)", i);
            if (i > 0 && t0_[i] < t0_[i - 1])
                detail::fail_at(who, "t0", "rows are not in time order (t0 decreases)", i);
        }
    }

    std::size_t rows() const noexcept { return t0_.size(); }
    std::span<const T> t0() const noexcept { return t0_; }
    std::span<const T> t1() const noexcept { return t1_; }

    /// The intervals of the rows listed, in that order (for nested plans).
    intervals subset(std::span<const std::size_t> rows) const {
        intervals s;
        s.t0_.reserve(rows.size());
        s.t1_.reserve(rows.size());
        for (std::size_t r : rows) {
            s.t0_.push_back(t0_[r]);
            s.t1_.push_back(t1_[r]);
        }
        return s;
    }

private:
    intervals() = default;
    std::vector<T> t0_, t1_;
};

template <value_range A, value_range B>
intervals(const A&, const B&) -> intervals<std::common_type_t<element_t<A>, element_t<B>>>;

HELDOUT_NAMESPACE_END
