// heldout/query/precision_at.hpp — precision and recall at a cutoff k within queries,
// tie-exact.
//
//   auto j = heldout::by_query(query, relevance);
//   double p5 = heldout::evaluate(heldout::measure::precision_at{.k = 5}, j, scores);
//   double r5 = heldout::evaluate(heldout::measure::recall_at{.k = 5}, j, scores);
//
// An item is relevant when its relevance is > 0; R = the query's number of relevant items.
//   P@k = (# relevant in the top k) / k   — divided by k even when the query has fewer than k
//                                          items (common practice; the query cannot fill k)
//   R@k = (# relevant in the top k) / R   — undefined when R = 0: skipped, or 0 with
//                                          .no_relevant = if_no_relevant::zero
// Tied scores (McSherry & Najork 2008): the block of tied items that straddles position k
// contributes its share of relevant items, E[# relevant in top k] = (relevant above the block)
// + r_b (k - items above the block) / n_b. The cutoff is found by selection, O(n) per query.
// k must be positive (input_error for k = 0).
#pragma once

#include <heldout/core/traits.hpp>
#include <heldout/detail/query_rank.hpp>
#include <heldout/query/accumulator.hpp>
#include <heldout/query/gains.hpp>
#include <heldout/query/judgements.hpp>

#include <algorithm>
#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace detail {
inline void check_cutoff(std::string_view who, std::size_t k) {
    if (k == 0)
        fail(who, "k", "the cutoff k must be positive");
}
} // namespace detail

namespace measure {

/// Precision at k: share of the top k that is relevant (divided by k); see the header comment.
struct precision_at {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    std::size_t k = 10; ///< cutoff (positive)

    bool operator==(const precision_at&) const = default;
    std::string name() const { return "P@" + std::to_string(k); }
    query_accumulator<precision_at> accumulator() const { return query_accumulator<precision_at>(*this); }

    void validate(std::string_view who) const { detail::check_cutoff(who, k); }
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace& ws) const {
        return detail::expected_relevant_in_top(s, rel, std::min(k, s.size()), ws).in_top / static_cast<double>(k);
    }
};

/// Recall at k: share of the query's relevant items in the top k; see the header comment.
struct recall_at {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    std::size_t k = 10;                                ///< cutoff (positive)
    if_no_relevant no_relevant = if_no_relevant::skip; ///< a query with no relevant item: skipped, or 0

    bool operator==(const recall_at&) const = default;
    std::string name() const {
        return detail::with_parameters("R@" + std::to_string(k),
                                       no_relevant == if_no_relevant::zero ? "no relevant item = 0" : "");
    }
    query_accumulator<recall_at> accumulator() const { return query_accumulator<recall_at>(*this); }

    void validate(std::string_view who) const { detail::check_cutoff(who, k); }
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace& ws) const {
        const auto c = detail::expected_relevant_in_top(s, rel, std::min(k, s.size()), ws);
        if (c.relevant == 0)
            return std::nullopt;
        return c.in_top / static_cast<double>(c.relevant);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
