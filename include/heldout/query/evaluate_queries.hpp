// heldout/query/evaluate_queries.hpp — a query measure on a whole data set, with the value of
// every query: the result that estimate_queries and compare_queries take.
//
//   auto r = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores);
//   r.mean;                       // mean over the scored queries
//   for (const auto& q : r.per_query) use(q.query, q.value);   // in order of first appearance
//   r.skipped;                    // ids of the queries left out (no relevant item)
//   std::cout << r << '\n';
//   // NDCG@10 0.7123 over 950 queries; 50 queries with no relevant item skipped; 95000 rows
//   auto w = heldout::evaluate_queries(m, query, relevance, scores, weights);  // per-query weights
//
// query: integral ids (any values; rows of one query need not be contiguous — grouping costs
// nothing when they are). relevance: graded, >= 0 (integers or reals). scores: floating
// point, higher ranked first. weights (optional): floating point, one per row, equal on the
// rows of a query; mean = Σ w_q v_q / Σ w_q.
// Queries skipped: a measure undefined without a relevant item (NDCG, R@k, reciprocal rank,
// AP@k) leaves such a query out of the mean and of per_query and lists it in skipped,
// unless the measure says .no_relevant = if_no_relevant::zero (then it scores 0). DCG and
// P@k are defined (0) there and never skip. The printed result says which.
// Errors: as the accumulator (query/accumulator.hpp), plus empty input; undefined_error when
// no query is scored.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/query/accumulator.hpp>
#include <heldout/query/judgements.hpp>

#include <cstddef>
#include <cstdint>
#include <ostream>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// What happens to a query with no relevant item under a measure.
enum class no_relevant_rule : std::uint8_t {
    defined, ///< the measure is defined there (DCG, P@k: 0) and the query counts
    skipped, ///< the query is left out (listed in skipped)
    zero     ///< the measure is undefined there and the query counts 0 (if_no_relevant::zero)
};

/// A query measure on a data set: the mean and the value of every query.
struct query_result {
    std::string measure;                               ///< the measure's name()
    double mean = 0;                                   ///< weighted mean over the scored queries
    std::vector<query_value> per_query;                ///< scored queries, in order of first appearance
    std::vector<std::int64_t> skipped;                 ///< queries left out (no relevant item)
    no_relevant_rule rule = no_relevant_rule::skipped; ///< what a query with no relevant item does
    direction better = direction::higher_is_better;
    std::size_t rows = 0;  ///< rows scored
    bool weighted = false; ///< per-query weights were given
};

namespace detail {
/// "1 query", "3 queries"; "1 row", "3 rows".
inline std::string queries_text(std::size_t k) { return std::to_string(k) + (k == 1 ? " query" : " queries"); }
inline std::string rows_text(std::size_t k) { return std::to_string(k) + (k == 1 ? " row" : " rows"); }
} // namespace detail

/// The words for a result's rule on queries with no relevant item.
inline std::string no_relevant_text(const query_result& r) {
    switch (r.rule) {
    case no_relevant_rule::defined:
        return "queries with no relevant item count (the measure is 0 there)";
    case no_relevant_rule::zero:
        return "queries with no relevant item count 0";
    case no_relevant_rule::skipped:
        break;
    }
    return detail::queries_text(r.skipped.size()) + " with no relevant item skipped";
}

/// "NDCG@10 0.7123 over 950 queries; 50 queries with no relevant item skipped; 95000 rows".
inline std::ostream& operator<<(std::ostream& os, const query_result& r) {
    return os << r.measure << ' ' << detail::readable_number(r.mean) << " over "
              << detail::queries_text(r.per_query.size()) << (r.weighted ? " (weighted)" : "") << "; "
              << no_relevant_text(r) << "; " << detail::rows_text(r.rows);
}

namespace detail {

template <class M>
constexpr no_relevant_rule rule_of(const M& m) {
    if constexpr (requires { m.no_relevant; })
        return m.no_relevant == if_no_relevant::zero ? no_relevant_rule::zero : no_relevant_rule::skipped;
    else
        return no_relevant_rule::defined;
}

template <class M>
query_result result_of(const M& m, const query_accumulator<M>& acc) {
    query_result r;
    r.measure = m.name();
    r.rule = rule_of(m);
    r.better = M::better;
    r.per_query.assign(acc.per_query().begin(), acc.per_query().end());
    r.skipped.assign(acc.skipped().begin(), acc.skipped().end());
    r.rows = acc.rows();
    r.weighted = acc.weighted();
    r.mean = acc.value();
    return r;
}

} // namespace detail

/// A query measure on a whole data set, with the value of each query.
template <outer_measure M, label_range Q, value_range R, real_range P>
query_result evaluate_queries(const M& m, const Q& query, const R& relevance, const P& scores) {
    static_assert(check_measure<M>());
    static_assert(std::is_same_v<truth_kind_t<M>, kinds::graded_relevance>,
                  "heldout::evaluate_queries takes a query measure (truth: graded relevance within queries)");
    constexpr std::string_view who = "heldout::evaluate_queries";
    const auto q = values_of(query, who, "query");
    detail::check_nonempty(who, "query", q.size());
    detail::check_same_size(who, "relevance", q.size(), values_of(relevance, who, "relevance").size(), "query");
    auto acc = m.accumulator();
    acc.add(by_query(query, relevance), scores);
    return detail::result_of(m, acc);
}

/// The same with per-query weights (one per row, equal on the rows of a query).
template <outer_measure M, label_range Q, value_range R, real_range P, real_range W>
query_result evaluate_queries(const M& m, const Q& query, const R& relevance, const P& scores, const W& weights) {
    static_assert(check_measure<M>());
    static_assert(std::is_same_v<truth_kind_t<M>, kinds::graded_relevance>,
                  "heldout::evaluate_queries takes a query measure (truth: graded relevance within queries)");
    constexpr std::string_view who = "heldout::evaluate_queries";
    const auto q = values_of(query, who, "query");
    detail::check_nonempty(who, "query", q.size());
    detail::check_same_size(who, "relevance", q.size(), values_of(relevance, who, "relevance").size(), "query");
    auto acc = m.accumulator();
    acc.add(by_query(query, relevance), scores, weights);
    return detail::result_of(m, acc);
}

HELDOUT_NAMESPACE_END
