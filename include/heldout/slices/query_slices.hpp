// heldout/slices/query_slices.hpp — subgroups for query measures (NDCG, AP@k, P@k, ...): one
// estimate per slice of the queries (market, device, query type), each compared with the
// other queries, with the same too-small rule, Holm adjustment, worst-slice note and
// Bonferroni option as estimate_slices on an aggregator (slices/estimate_slices.hpp).
//
//   auto r = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores);
//   std::vector<int> market = ...;                      // one slice id per data row
//   for (const heldout::slice_estimate& s : heldout::estimate_slices(r, query, market, {}))
//       std::cout << s << '\n';
//
// Query measures are scored per query, and the queries are the independent units, so:
//  * `query` and `slice_of_row` are per data row, as given to evaluate_queries; every row of a
//    query must carry the same slice id (a query split across slices is an input_error naming
//    the row);
//  * .estimate is estimate_queries on the slice's scored queries (ci::t by default;
//    ci::bootstrap_percentile and ci::bca resample the slice's queries), its value their
//    (weighted) mean; .rows counts the slice's data rows, .class_rows stays empty (graded
//    relevance is not a class) and .splits_with_rows is 1;
//  * .too_small: fewer than 20 scored queries (the rule's 20 units for a truth that is not a
//    class, counted in queries because rows of one query are not independent); such a slice
//    keeps its value, loses its interval and is not compared;
//  * .versus_rest: slice mean − mean of the other scored queries, two independent samples of
//    queries: Welch's (1947) t with Welch-Satterthwaite degrees of freedom from the two t
//    standard errors (ci::t), or a z from the two bootstrap standard errors; p-values
//    Holm-adjusted across the slices compared;
//  * .worst, the note and options.simultaneous as in estimate_slices.
// Queries skipped by the measure (no relevant item) stay out of every mean, and each slice's
// notes count its own skipped queries. A slice with no scored query, or one only, has an
// entry with .undefined set and no interval.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/query/estimate_queries.hpp>
#include <heldout/query/evaluate_queries.hpp>
#include <heldout/slices/estimate_slices.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail::slices {

/// The result restricted to the queries whose slice index is k (order kept), its mean
/// recomputed over them.
inline query_result query_subset(const query_result& r, const std::vector<std::size_t>& slice_of_scored,
                                 const std::vector<std::size_t>& slice_of_skipped, std::size_t k, bool inside,
                                 std::size_t rows) {
    query_result s;
    s.measure = r.measure;
    s.rule = r.rule;
    s.better = r.better;
    s.weighted = r.weighted;
    s.rows = rows;
    compensated_sum num, den;
    for (std::size_t i = 0; i < r.per_query.size(); ++i)
        if ((slice_of_scored[i] == k) == inside) {
            s.per_query.push_back(r.per_query[i]);
            num.add(r.per_query[i].weight * r.per_query[i].value);
            den.add(r.per_query[i].weight);
        }
    for (std::size_t i = 0; i < r.skipped.size(); ++i)
        if ((slice_of_skipped[i] == k) == inside)
            s.skipped.push_back(r.skipped[i]);
    s.mean = s.per_query.empty() ? std::numeric_limits<double>::quiet_NaN() : num.value() / den.value();
    return s;
}

inline double query_badness(direction better, double v) { return better == direction::lower_is_better ? v : -v; }

} // namespace detail::slices

/// One estimate per slice of the queries, each compared with the other queries; see the
/// header comment.
template <label_range Q, value_range S>
std::vector<slice_estimate> estimate_slices(const query_result& result, const Q& query, const S& slice_of_row,
                                            const slice_options& options = {}) {
    using namespace detail::slices;
    static_assert(std::integral<element_t<S>>, "heldout::estimate_slices: slice ids are integers, one per data row");
    detail::check_level(who, options.level);
    const auto qs = values_of(query, who, "query");
    const auto ids = values_of(slice_of_row, who, "slice_of_row");
    if (qs.size() != ids.size())
        detail::fail(who, "slice_of_row",
                     "size " + std::to_string(ids.size()) + " differs from the " + std::to_string(qs.size()) +
                         " rows of query: give one slice id per data row");
    if (qs.empty())
        detail::fail(who, "query", "no rows");

    // Each query's slice id (one per query), sorted by query id for lookup.
    std::vector<std::pair<std::int64_t, std::int64_t>> q_slice; // (query, slice), first row's
    std::vector<std::size_t> first_row;
    {
        std::vector<std::size_t> order(qs.size());
        for (std::size_t i = 0; i < order.size(); ++i)
            order[i] = i;
        std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return qs[a] < qs[b]; });
        for (const std::size_t i : order) {
            const auto q = static_cast<std::int64_t>(qs[i]);
            const auto s = static_cast<std::int64_t>(ids[i]);
            if (!q_slice.empty() && q_slice.back().first == q) {
                if (q_slice.back().second != s)
                    detail::fail_at(who, "slice_of_row",
                                    "query " + std::to_string(q) + " has slice " +
                                        std::to_string(q_slice.back().second) + " at row " +
                                        std::to_string(first_row.back()) + " and slice " + std::to_string(s) +
                                        " here: every row of a query must be in one slice",
                                    i);
                continue;
            }
            q_slice.emplace_back(q, s);
            first_row.push_back(i);
        }
    }
    auto slice_id_of = [&](std::int64_t q) -> std::int64_t {
        const auto it = std::lower_bound(q_slice.begin(), q_slice.end(), q,
                                         [](const auto& e, std::int64_t x) { return e.first < x; });
        if (it == q_slice.end() || it->first != q)
            detail::fail(who, "query",
                         "query " + std::to_string(q) +
                             " of the result does not appear: give the query ids the result was evaluated on");
        return it->second;
    };

    std::vector<std::int64_t> distinct;
    for (const auto& e : q_slice)
        distinct.push_back(e.second);
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    const std::size_t K = distinct.size();
    auto index_of = [&](std::int64_t s) {
        return static_cast<std::size_t>(std::lower_bound(distinct.begin(), distinct.end(), s) - distinct.begin());
    };
    std::vector<std::size_t> slice_of_scored, slice_of_skipped, rows_of(K, 0);
    for (const auto& v : result.per_query)
        slice_of_scored.push_back(index_of(slice_id_of(v.query)));
    for (const auto q : result.skipped)
        slice_of_skipped.push_back(index_of(slice_id_of(q)));
    for (const auto s : ids)
        ++rows_of[index_of(static_cast<std::int64_t>(s))];

    const double level = options.simultaneous ? 1.0 - (1.0 - options.level) / static_cast<double>(K) : options.level;
    constexpr std::size_t min_queries = 20;
    std::vector<slice_estimate> out(K);
    std::vector<std::size_t> compared;
    std::vector<double> p_values;
    for (std::size_t k = 0; k < K; ++k) {
        slice_estimate& res = out[k];
        res.slice = distinct[k];
        res.rows = rows_of[k];
        res.splits_with_rows = 1;
        const query_result in = query_subset(result, slice_of_scored, slice_of_skipped, k, true, rows_of[k]);
        const query_result rest =
            query_subset(result, slice_of_scored, slice_of_skipped, k, false, qs.size() - rows_of[k]);
        const std::size_t scored = in.per_query.size();
        if (scored < min_queries) {
            res.too_small = true;
            res.too_small_reason = "fewer than 20 scored queries (" + std::to_string(scored) + ")";
        }
        try {
            res.estimate = estimate_queries(in, level, options.method);
        } catch (const undefined_error& e) {
            res.undefined = e.problem();
            res.estimate.measure = result.measure;
            res.estimate.level = level;
            res.estimate.value = in.mean;
            res.estimate.observations = scored;
            res.estimate.notes.push_back("undefined on this slice: " + res.undefined);
        }
        if (options.simultaneous)
            res.estimate.notes.push_back(simultaneous_note(K, level, options.level));
        if (res.too_small && res.undefined.empty()) {
            if (res.estimate.has_interval()) {
                res.estimate.se.reset();
                res.estimate.lower.reset();
                res.estimate.upper.reset();
                res.estimate.method_label += "; no interval: slice too small";
            }
            res.estimate.notes.push_back("slice too small (" + res.too_small_reason +
                                         "): its value is noisy and it is not compared with the rest");
        }
        if (res.too_small || !res.undefined.empty())
            continue;
        heldout::estimate r;
        try {
            r = estimate_queries(rest, level, options.method);
        } catch (const undefined_error&) {
            continue; // fewer than 2 other scored queries: nothing to compare with
        }
        const double s1 = *res.estimate.se, s2 = *r.se;
        const double se = std::sqrt(s1 * s1 + s2 * s2);
        if (!(se > 0))
            continue;
        slice_contrast c;
        c.rest_value = r.value;
        c.difference = res.estimate.value - r.value;
        c.se = se;
        c.statistic = c.difference / se;
        double crit = 0;
        if (res.estimate.method == ci::method_id::t) {
            const double q1 = static_cast<double>(scored) - 1, q2 = static_cast<double>(rest.per_query.size()) - 1;
            const double df = (se * se) * (se * se) / (s1 * s1 * s1 * s1 / q1 + s2 * s2 * s2 * s2 / q2);
            c.df = df;
            c.p_value = detail::two_sided_t_p(c.statistic, df);
            crit = detail::two_sided_t(level, df);
            c.method_label = "Welch t on the two sets of queries (independent), df " + detail::readable_number(df);
        } else {
            c.p_value = std::min(1.0, 2.0 * detail::normal_cdf(-std::abs(c.statistic)));
            crit = detail::two_sided_z(level);
            c.method_label = "z from the bootstrap standard errors of slice and rest (independent queries)";
        }
        c.lower = c.difference - crit * se;
        c.upper = c.difference + crit * se;
        res.versus_rest = c;
        compared.push_back(k);
        p_values.push_back(c.p_value);
    }
    finish_slices(out, compared, p_values, [&](double v) { return query_badness(result.better, v); });
    return out;
}

HELDOUT_NAMESPACE_END
