// heldout/query/compare_queries.hpp — two rankers on the same queries: the mean per-query
// difference, a paired t, and the paired randomization (sign-flip) test.
//
//   auto a = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores_a);
//   auto b = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores_b);
//   heldout::comparison c = heldout::compare_queries(a, b, {});          // the defaults
//   auto d = heldout::compare_queries(a, b, {.method = heldout::paired::query_t, .level = 0.9});
//   std::cout << c << '\n';
//   // NDCG@10 (12 queries with no relevant item skipped) A - B = 0.0123 [0.0041, 0.0205] 95%, paired
//   // randomization (sign flip) over queries 2.95, df 499, p = 0.0031; 1 split, n=500
//
// d_q = value_A(q) - value_B(q) over the Q queries scored in both (paired by query id).
//   difference = Σ w_q d_q / Σ w_q (w = 1 without weights), se = sqrt(Q/(Q-1) Σ w² (d - mean)²) / Σ w
//   (= sd(d)/√Q without weights), statistic = difference / se (paired t, df Q - 1), interval
//   difference ± t_{1-α/2, Q-1} se.
//   p_value, paired::randomization (default; Fisher 1935, recommended for retrieval by Smucker,
//   Allan & Carterette 2007): two-sided, the share of sign vectors s in {±1}^Q with
//   |Σ s_q e_q| >= |Σ e_q| - ε, e_q = w_q d_q, the observed vector included; exact enumeration
//   of all 2^Q vectors when Q <= exact_up_to (20), else B >= 10,000 seeded Monte Carlo draws
//   (heldout::rng(seed), one bit per query, low bit first) with p = (1 + hits) / (1 + B)
//   (Phipson & Smyth 2010). ε = 1e-10 Σ |e_q| absorbs the rounding of the sums.
//   p_value, paired::query_t: the two-sided p of the paired t.
// A difference that is the same on every query has se = 0: the statistic is ±infinity (0 when
// the difference is 0) and the paired t's p is 0 (1).
// Refused (input_error): results of different measures, query sets that differ (naming a
// query missing from one side), a query listed twice, weights that differ between the
// results, exact_up_to above 26, fewer than 10,000 Monte Carlo resamples, another method.
// Fewer than 2 common queries: undefined_error.
#pragma once

#include <heldout/compare/comparison.hpp>
#include <heldout/compare/paired.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/random.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/query/estimate_queries.hpp>
#include <heldout/query/evaluate_queries.hpp>

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Settings of compare_queries (a plain aggregate: `compare_queries(a, b, {})` is the default).
struct query_comparison_options {
    paired::method method = paired::randomization; ///< paired::randomization or paired::query_t
    double level = 0.95;                           ///< of the t interval of the difference
    std::size_t resamples = 10000;                 ///< Monte Carlo sign vectors (at least 10,000)
    std::uint64_t seed = 0;                        ///< of the Monte Carlo draws
    std::size_t exact_up_to = 20;                  ///< enumerate all 2^Q sign vectors up to this Q (at most 26)
    std::string model_a = "A";                     ///< names used in printing and export
    std::string model_b = "B";
};

/// A sign-flip p-value and how it was obtained.
struct sign_flip_result {
    double p_value = 1;
    bool exact = true;
    std::size_t vectors = 0; ///< sign vectors counted (2^Q, or the Monte Carlo draws)
    std::size_t hits = 0;    ///< of them, |Σ s e| >= |Σ e| - ε (Monte Carlo: the observed one not included)
};

/// The two-sided paired randomization p-value of the terms e (see the header comment).
inline sign_flip_result sign_flip_test(std::span<const double> e, std::size_t exact_up_to = 20,
                                       std::size_t resamples = 10000, std::uint64_t seed = 0) {
    constexpr std::string_view who = "heldout::sign_flip_test";
    if (exact_up_to > 26)
        detail::fail(who, "exact_up_to", "at most 26 (2^26 sign vectors); larger sets use the Monte Carlo test");
    const std::size_t q = e.size();
    detail::check_nonempty(who, "e", q);
    detail::check_finite(who, "e", e);
    double total = 0, scale = 0;
    for (const double x : e) {
        total += x;
        scale += std::abs(x);
    }
    const double observed = std::abs(total);
    const double bar = observed - 1e-10 * scale;
    sign_flip_result r;
    if (q <= exact_up_to) {
        // Gray code: consecutive sign vectors differ in one sign, so each sum costs one update.
        std::vector<double> sign(q, 1.0);
        double sum = total;
        const std::uint64_t count = std::uint64_t{1} << q;
        std::uint64_t hits = std::abs(sum) >= bar ? 1u : 0u;
        for (std::uint64_t g = 1; g < count; ++g) {
            const auto j = static_cast<std::size_t>(std::countr_zero(g));
            sum -= 2.0 * sign[j] * e[j];
            sign[j] = -sign[j];
            hits += std::abs(sum) >= bar ? 1u : 0u;
        }
        r.exact = true;
        r.vectors = static_cast<std::size_t>(count);
        r.hits = static_cast<std::size_t>(hits);
        r.p_value = static_cast<double>(hits) / static_cast<double>(count);
        return r;
    }
    if (resamples < 10000)
        detail::fail(who, "resamples",
                     "the Monte Carlo test takes at least 10000 resamples, got " + std::to_string(resamples));
    rng g(seed);
    std::size_t hits = 0;
    for (std::size_t b = 0; b < resamples; ++b) {
        double sum = 0;
        std::uint64_t bits = 0;
        for (std::size_t i = 0; i < q; ++i) {
            if (i % 64 == 0)
                bits = g();
            sum += (bits & 1u) ? -e[i] : e[i];
            bits >>= 1;
        }
        hits += std::abs(sum) >= bar ? 1u : 0u;
    }
    r.exact = false;
    r.vectors = resamples;
    r.hits = hits;
    r.p_value = (1.0 + static_cast<double>(hits)) / (1.0 + static_cast<double>(resamples));
    return r;
}

namespace detail {

/// (id, index) of a result's scored queries, sorted by id; a query listed twice is refused.
inline std::vector<std::pair<std::int64_t, std::size_t>> query_index(const query_result& r, std::string_view who,
                                                                     std::string_view arg) {
    std::vector<std::pair<std::int64_t, std::size_t>> ix(r.per_query.size());
    for (std::size_t i = 0; i < r.per_query.size(); ++i)
        ix[i] = {r.per_query[i].query, i};
    std::sort(ix.begin(), ix.end());
    for (std::size_t i = 1; i < ix.size(); ++i)
        if (ix[i].first == ix[i - 1].first)
            fail(who, arg,
                 "query " + std::to_string(ix[i].first) +
                     " is listed twice: results to compare score each query once (evaluate_queries, or one "
                     "accumulator over distinct queries)");
    return ix;
}

inline const std::pair<std::int64_t, std::size_t>*
find_query(const std::vector<std::pair<std::int64_t, std::size_t>>& ix, std::int64_t id) {
    auto it = std::lower_bound(ix.begin(), ix.end(), std::pair<std::int64_t, std::size_t>{id, 0});
    return it != ix.end() && it->first == id ? &*it : nullptr;
}

inline std::string missing_text(const query_result& other, std::int64_t id) {
    const bool skipped = std::find(other.skipped.begin(), other.skipped.end(), id) != other.skipped.end();
    return skipped ? " (skipped there: no relevant item)" : "";
}

} // namespace detail

/// Compares two rankers on the same queries (see the header comment).
// A template of an unused parameter: the Student-t code it calls (Boost.Math) is compiled only
// where it is used (include cost, bench/include_cost.sh).
template <class = void>
comparison compare_queries(const query_result& a, const query_result& b, const query_comparison_options& o = {}) {
    constexpr std::string_view who = "heldout::compare_queries";
    detail::check_level(who, o.level);
    const paired::method_id id =
        o.method.id == paired::method_id::automatic ? paired::method_id::randomization : o.method.id;
    if (id != paired::method_id::randomization && id != paired::method_id::query_t)
        detail::fail(who, "options.method",
                     "paired::" + std::string(paired::id_text(id)) +
                         " does not apply to per-query values; use paired::randomization (the default) or "
                         "paired::query_t");
    if (a.measure != b.measure)
        detail::fail(who, "b", "results of different measures: '" + a.measure + "' and '" + b.measure + "'");
    const auto ia = detail::query_index(a, who, "a");
    const auto ib = detail::query_index(b, who, "b");
    std::vector<double> d, w;
    d.reserve(a.per_query.size());
    w.reserve(a.per_query.size());
    for (const auto& qa : a.per_query) {
        const auto* hit = detail::find_query(ib, qa.query);
        if (!hit)
            detail::fail(who, "b",
                         "query " + std::to_string(qa.query) + " of " + o.model_a + " is missing from " + o.model_b +
                             detail::missing_text(b, qa.query) + ": the query sets differ");
        const auto& qb = b.per_query[hit->second];
        if (qa.weight != qb.weight)
            detail::fail(who, "b",
                         "query " + std::to_string(qa.query) + " has weight " + detail::number_text(qa.weight) +
                             " in " + o.model_a + " and " + detail::number_text(qb.weight) + " in " + o.model_b);
        d.push_back(qa.value - qb.value);
        w.push_back(qa.weight);
    }
    if (ib.size() != ia.size())
        for (const auto& qb : b.per_query)
            if (!detail::find_query(ia, qb.query))
                detail::fail(who, "a",
                             "query " + std::to_string(qb.query) + " of " + o.model_b + " is missing from " +
                                 o.model_a + detail::missing_text(a, qb.query) + ": the query sets differ");
    const std::size_t q = d.size();
    if (q < 2)
        detail::fail_undefined(who, "a paired comparison over queries needs at least 2 common queries, " +
                                        detail::queries_text(q) + " scored");

    comparison c;
    // The printed line says what happened to queries with no relevant item.
    c.measure = a.measure + " (" + no_relevant_text(a) + ")";
    c.model_a = o.model_a;
    c.model_b = o.model_b;
    c.level = o.level;
    c.method = id;
    c.method_label = std::string(paired::label(id));
    c.splits = 1;
    c.observations = q;
    const auto ms = detail::weighted_mean_and_se(d, w);
    const double df = static_cast<double>(q - 1);
    c.difference = ms.mean;
    c.se = ms.se;
    c.df = df;
    double p_t = 1;
    if (ms.se > 0) {
        c.statistic = ms.mean / ms.se;
        p_t = detail::two_sided_t_p(c.statistic, df);
    } else {
        c.statistic = ms.mean == 0 ? 0.0 : std::copysign(std::numeric_limits<double>::infinity(), ms.mean);
        p_t = ms.mean == 0 ? 1.0 : 0.0;
        c.notes.push_back("the difference is the same on every query: se = 0");
    }
    const double tq = detail::two_sided_t(o.level, df);
    c.lower = ms.mean - tq * ms.se;
    c.upper = ms.mean + tq * ms.se;
    c.notes.push_back("paired over " + detail::queries_text(q) + (a.weighted ? " (weighted)" : "") + "; " +
                      no_relevant_text(a));
    if (id == paired::method_id::query_t) {
        c.p_value = p_t;
        c.notes.push_back("paired t, df " + std::to_string(q - 1));
        return c;
    }
    std::vector<double> e(q);
    for (std::size_t i = 0; i < q; ++i)
        e[i] = w[i] * d[i];
    const auto sf = sign_flip_test(e, o.exact_up_to, o.resamples, o.seed);
    c.p_value = sf.p_value;
    c.notes.push_back(sf.exact ? "randomization p exact over all " + std::to_string(sf.vectors) + " sign vectors"
                               : "randomization p by Monte Carlo: " + std::to_string(sf.vectors) +
                                     " sign vectors, seed " + std::to_string(o.seed) + ", p = (1 + hits)/(1 + B)");
    c.notes.push_back("statistic: paired t, df " + std::to_string(q - 1) + ", its p = " + detail::readable_number(p_t));
    return c;
}

HELDOUT_NAMESPACE_END
