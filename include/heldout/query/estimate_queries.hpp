// heldout/query/estimate_queries.hpp — an interval for a query measure's mean over queries:
// the queries are the independent units.
//
//   auto r = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores);
//   heldout::estimate e = heldout::estimate_queries(r, 0.95);                 // t over queries
//   auto b = heldout::estimate_queries(r, 0.95, heldout::ci::bca(5000, 7));    // bootstrap over queries
//   std::cout << e << '\n';
//   // NDCG@10 0.7123 [0.7011, 0.7235] 95% Student t over queries; 50 queries with no relevant item skipped, n=950
//
// Methods (ci::method; the estimate's n is the number of scored queries):
//   ci::t (default; ci::automatic picks it)  Student t on the per-query values: mean m =
//        Σ w v / Σ w, se = sqrt(Q/(Q-1) Σ w² (v - m)²) / Σ w (without weights: sd/√Q, the
//        textbook t; with weights the linearised variance of a ratio mean, Cochran 1977 §6.3),
//        interval m ± t_{1-α/2, Q-1} se.
//   ci::bootstrap_percentile, ci::bca  queries resampled with replacement (the counts of
//        heldout::bootstrap_counts over the Q queries, replicate b of the given seed), the
//        weighted mean of each replicate; percentile or BCa interval (jackknife acceleration
//        from the leave-one-query-out means), as estimate/bootstrap.hpp.
// Other methods are refused (input_error). Fewer than 2 scored queries: undefined_error.
// Notes say how many queries were scored and what happened to those with no relevant item.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/query/evaluate_queries.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// The weighted mean of values and its linearised standard error (see the header comment).
struct weighted_mean_se {
    double mean = 0;
    double se = 0;
};

inline weighted_mean_se weighted_mean_and_se(std::span<const double> v, std::span<const double> w) {
    const std::size_t q = v.size();
    compensated_sum num, den;
    for (std::size_t i = 0; i < q; ++i) {
        num.add(w[i] * v[i]);
        den.add(w[i]);
    }
    const double total = den.value();
    const double m = num.value() / total;
    compensated_sum ss;
    for (std::size_t i = 0; i < q; ++i) {
        const double d = w[i] * (v[i] - m);
        ss.add(d * d);
    }
    const double qd = static_cast<double>(q);
    return {m, std::sqrt(qd / (qd - 1) * ss.value()) / total};
}

/// Values and weights of a result's scored queries.
inline void values_and_weights(const query_result& r, std::vector<double>& v, std::vector<double>& w) {
    v.clear();
    w.clear();
    for (const auto& q : r.per_query) {
        v.push_back(q.value);
        w.push_back(q.weight);
    }
}

/// The weighted mean of one bootstrap replicate of the queries (false when its weight is 0).
inline bool replicate_mean(std::span<const double> v, std::span<const double> w, std::span<const std::uint32_t> c,
                           double& out) {
    compensated_sum num, den;
    for (std::size_t i = 0; i < v.size(); ++i) {
        if (c[i] == 0)
            continue;
        const double cw = static_cast<double>(c[i]) * w[i];
        num.add(cw * v[i]);
        den.add(cw);
    }
    if (!(den.value() > 0))
        return false;
    out = num.value() / den.value();
    return true;
}

} // namespace detail

/// An interval for the mean of a query measure over queries (see the header comment).
// A template of an unused parameter: the Student-t and bootstrap code it calls (Boost.Math)
// is compiled only where it is used (include cost, bench/include_cost.sh).
template <class = void>
heldout::estimate estimate_queries(const query_result& r, double level = 0.95, ci::method method = ci::t) {
    constexpr std::string_view who = "heldout::estimate_queries";
    detail::check_level(who, level);
    const std::size_t q = r.per_query.size();
    if (q < 2)
        detail::fail_undefined(who, "an interval over queries needs at least 2 scored queries, " +
                                        detail::queries_text(q) + " scored");
    ci::method_id id = method.id == ci::method_id::automatic ? ci::method_id::t : method.id;
    if (id != ci::method_id::t && id != ci::method_id::bootstrap_percentile && id != ci::method_id::bca)
        detail::fail(who, "method",
                     "ci::" + std::string(ci::id_text(id)) +
                         " does not apply to per-query values; use ci::t (the default), ci::bootstrap_percentile or "
                         "ci::bca (both resample queries)");
    std::vector<double> v, w;
    detail::values_and_weights(r, v, w);

    heldout::estimate e;
    e.measure = r.measure;
    e.level = level;
    e.method = id;
    // The printed line says what happened to queries with no relevant item.
    e.method_label = std::string(ci::label(id)) + " over queries; " + no_relevant_text(r);
    e.observations = q;
    e.value = r.mean;
    e.notes.push_back(detail::queries_text(q) + " scored" + (r.weighted ? " (weighted)" : "") + "; " +
                      no_relevant_text(r));
    if (id == ci::method_id::t) {
        const auto ms = detail::weighted_mean_and_se(v, w);
        const double t = detail::two_sided_t(level, static_cast<double>(q - 1));
        e.se = ms.se;
        e.lower = r.mean - t * ms.se;
        e.upper = r.mean + t * ms.se;
        e.notes.push_back("t interval on the per-query values, df " + std::to_string(q - 1));
        return e;
    }
    // The bootstrap over queries.
    if (method.replicates < 2)
        detail::fail(who, "method", "at least 2 bootstrap replicates are needed");
    std::vector<std::uint32_t> counts(q);
    std::vector<double> reps;
    reps.reserve(method.replicates);
    std::size_t undefined = 0;
    for (std::size_t b = 0; b < method.replicates; ++b) {
        bootstrap_counts(counts, method.seed, b);
        double m = 0;
        if (detail::replicate_mean(v, w, counts, m))
            reps.push_back(m);
        else
            ++undefined;
    }
    if (reps.size() < 2)
        detail::fail_undefined(who, "fewer than 2 bootstrap replicates have a positive total weight");
    std::sort(reps.begin(), reps.end());
    bootstrap_result br;
    if (id == ci::method_id::bca) {
        // Jackknife: the mean without query i.
        std::vector<double> jack(q);
        std::vector<std::uint32_t> ones(q, 1);
        for (std::size_t i = 0; i < q; ++i) {
            ones[i] = 0;
            double m = 0;
            if (!detail::replicate_mean(v, w, ones, m))
                detail::fail_undefined(who, "the jackknife leaves no query with positive weight");
            jack[i] = m;
            ones[i] = 1;
        }
        br = detail::bca_from_sorted(r.mean, reps, jack, level, who);
    } else {
        br = detail::percentile_from_sorted(r.mean, reps, level);
    }
    e.lower = br.lower;
    e.upper = br.upper;
    double sum = 0;
    for (const double x : reps)
        sum += x;
    const double mean = sum / static_cast<double>(reps.size());
    double ss = 0;
    for (const double x : reps)
        ss += (x - mean) * (x - mean);
    e.se = std::sqrt(ss / static_cast<double>(reps.size() - 1));
    e.notes.push_back(std::to_string(method.replicates) + " bootstrap replicates of the queries, seed " +
                      std::to_string(method.seed) +
                      (undefined ? ", " + std::to_string(undefined) + " with zero total weight left out" : ""));
    return e;
}

HELDOUT_NAMESPACE_END
