// heldout/query/reciprocal_rank.hpp — the reciprocal rank of the first relevant item of each
// query (its mean over queries is the MRR), tie-exact.
//
//   double mrr = heldout::evaluate(heldout::measure::reciprocal_rank{}, heldout::by_query(query, rel), scores);
//
// RR = 1 / (position of the first item with relevance > 0). Undefined for a query with no
// relevant item: skipped, or 0 with .no_relevant = if_no_relevant::zero.
// Tied scores (McSherry & Najork 2008): let the first block holding a relevant item start at
// position s, with n items of which r are relevant. The number X of non-relevant items of the
// block before its first relevant one has P(X = x) = C(n - 1 - x, r - 1) / C(n, r),
// x = 0 .. n - r, and E[RR] = sum_x P(X = x) / (s + x). O(n) per query, no sort.
#pragma once

#include <heldout/core/traits.hpp>
#include <heldout/detail/query_rank.hpp>
#include <heldout/query/accumulator.hpp>
#include <heldout/query/gains.hpp>
#include <heldout/query/judgements.hpp>

#include <optional>
#include <span>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Reciprocal rank of the first relevant item; see the header comment.
struct reciprocal_rank {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    if_no_relevant no_relevant = if_no_relevant::skip; ///< a query with no relevant item: skipped, or 0

    bool operator==(const reciprocal_rank&) const = default;
    std::string name() const {
        return detail::with_parameters("reciprocal rank",
                                       no_relevant == if_no_relevant::zero ? "no relevant item = 0" : "");
    }
    query_accumulator<reciprocal_rank> accumulator() const { return query_accumulator<reciprocal_rank>(*this); }

    void validate(std::string_view) const noexcept {}
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace&) const {
        if (detail::relevant_count(rel) == 0)
            return std::nullopt;
        return detail::expected_reciprocal_rank(s, rel);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
