// heldout/query/ndcg.hpp — discounted cumulated gain within queries: DCG@k and NDCG@k,
// tie-exact.
//
//   auto j = heldout::by_query(query, relevance);
//   double n10 = heldout::evaluate(heldout::measure::ndcg{.k = 10}, j, scores);     // gain 2^rel - 1
//   double lin = heldout::evaluate(heldout::measure::ndcg{.k = 10, .gain = heldout::gain::linear}, j, scores);
//   double all = heldout::evaluate(heldout::measure::dcg{.k = 0}, j, scores);        // k = 0: the whole list
//   auto r = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores);  // per query
//
// Within a query, items ordered by score, highest first, positions i = 1, 2, ... (Järvelin &
// Kekäläinen 2002; the exponential gain as in Burges et al. 2005):
//   DCG@k  = sum_{i <= min(k, n)} g(rel_(i)) / log2(1 + i)
//   IDCG@k = DCG@k of the query's relevances sorted decreasingly (all judged items of the query)
//   NDCG@k = DCG@k / IDCG@k
// Tied scores: the expectation over all orders of the tied items (McSherry & Najork 2008),
// E[DCG@k] = sum over tie blocks b of (G_b / n_b) * (sum of the discounts of b's positions <= k).
// The value is the mean over queries (weighted with per-query weights). A query with no
// relevant item has IDCG = 0: NDCG is undefined there and the query is skipped (or counts 0
// with .no_relevant = if_no_relevant::zero); its DCG is 0, which counts.
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
inline std::string cutoff_name(std::string_view base, std::size_t k) {
    return k == 0 ? std::string(base) : std::string(base) + "@" + std::to_string(k);
}
inline std::string query_parameters(gain g, bool has_gain, if_no_relevant p, bool has_policy) {
    std::string s;
    if (has_gain && g == gain::linear)
        s += "linear gain";
    if (has_policy && p == if_no_relevant::zero)
        s += std::string(s.empty() ? "" : ", ") + "no relevant item = 0";
    return s;
}
} // namespace detail

namespace measure {

/// Normalised discounted cumulated gain at k (k = 0: the whole list); see the header comment.
struct ndcg {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    std::size_t k = 10;                                ///< cutoff; 0 = the whole list
    heldout::gain gain = heldout::gain::exponential;   ///< 2^rel - 1, or rel
    if_no_relevant no_relevant = if_no_relevant::skip; ///< a query with no relevant item: skipped, or 0

    bool operator==(const ndcg&) const = default;
    std::string name() const {
        return detail::with_parameters(detail::cutoff_name("NDCG", k),
                                       detail::query_parameters(gain, true, no_relevant, true));
    }
    query_accumulator<ndcg> accumulator() const { return query_accumulator<ndcg>(*this); }

    /// Parameter check (every value of k is valid).
    void validate(std::string_view) const noexcept {}
    /// The value on one query, or nothing when the query has no relevant item.
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace& ws) const {
        const std::size_t K = k == 0 ? s.size() : std::min(k, s.size());
        const double ideal = detail::ideal_dcg(rel, K, gain, ws);
        if (!(ideal > 0))
            return std::nullopt;
        detail::head_blocks(s, rel, K, true, gain, ws);
        return detail::expected_dcg(ws.blocks, K, ws) / ideal;
    }
};

/// Discounted cumulated gain at k (k = 0: the whole list); defined (0) without relevant items.
struct dcg {
    static constexpr direction better = direction::higher_is_better;
    using prediction = kinds::query_score;
    using truth = kinds::graded_relevance;

    std::size_t k = 10;                              ///< cutoff; 0 = the whole list
    heldout::gain gain = heldout::gain::exponential; ///< 2^rel - 1, or rel

    bool operator==(const dcg&) const = default;
    std::string name() const {
        return detail::with_parameters(detail::cutoff_name("DCG", k),
                                       detail::query_parameters(gain, true, if_no_relevant::skip, false));
    }
    query_accumulator<dcg> accumulator() const { return query_accumulator<dcg>(*this); }

    void validate(std::string_view) const noexcept {}
    template <class S, class R>
    std::optional<double> of_query(std::span<const S> s, std::span<const R> rel, detail::query_workspace& ws) const {
        if (detail::relevant_count(rel) == 0)
            return 0.0;
        const std::size_t K = k == 0 ? s.size() : std::min(k, s.size());
        detail::head_blocks(s, rel, K, true, gain, ws);
        return detail::expected_dcg(ws.blocks, K, ws);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
