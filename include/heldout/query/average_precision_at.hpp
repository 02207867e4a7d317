// heldout/query/average_precision_at.hpp — average precision at k within queries (its mean
// over queries is the MAP), tie-exact.
//
//   auto j = heldout::by_query(query, relevance);
//   double ap10 = heldout::evaluate(heldout::measure::average_precision_at{.k = 10}, j, scores);
//   double ap = heldout::evaluate(heldout::measure::average_precision_at{.k = 0}, j, scores);  // whole list
//
// rel_i = 1 when the item at position i has relevance > 0; R = the query's relevant items.
//   AP@k = (1 / min(k, R)) sum_{i <= k} rel_i P@i,   k = 0: (1 / R) sum_{i <= n} rel_i P@i
// (normalised so that a perfect top k scores 1; conventions differ in the literature, see
// docs/query.md). Undefined when R = 0: skipped, or 0 with .no_relevant = if_no_relevant::zero.
// Tied scores (McSherry & Najork 2008), expectation over all orders of tied items:
//   E[rel_i P@i] = (1/i) (E[rel_i] + sum_{j<i} E[rel_i rel_j]); position i in block b (n_b items,
//   r_b relevant, starting at s_b): E[rel_i] = r_b/n_b, earlier blocks give (r_b/n_b) R_before,
//   earlier positions of b give (i - s_b) r_b (r_b - 1) / (n_b (n_b - 1)).
// O(n + k log k) per query with a cutoff; the whole list sorts the query.
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
namespace measure {

/// Average precision at k (k = 0: the whole list); see the header comment.
struct average_precision_at {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    std::size_t k = 10;                                ///< cutoff; 0 = the whole list
    if_no_relevant no_relevant = if_no_relevant::skip; ///< a query with no relevant item: skipped, or 0

    bool operator==(const average_precision_at&) const = default;
    std::string name() const {
        return detail::with_parameters(k == 0 ? std::string("AP") : "AP@" + std::to_string(k),
                                       no_relevant == if_no_relevant::zero ? "no relevant item = 0" : "");
    }
    query_accumulator<average_precision_at> accumulator() const {
        return query_accumulator<average_precision_at>(*this);
    }

    void validate(std::string_view) const noexcept {}
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace& ws) const {
        const std::size_t relevant = detail::relevant_count(rel);
        if (relevant == 0)
            return std::nullopt;
        const std::size_t K = k == 0 ? s.size() : std::min(k, s.size());
        const std::size_t D = k == 0 ? relevant : std::min(k, relevant);
        detail::head_blocks(s, rel, K, false, gain::linear, ws);
        return detail::expected_precision_sum(ws.blocks, K) / static_cast<double>(D);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
