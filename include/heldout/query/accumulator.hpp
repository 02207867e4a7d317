// heldout/query/accumulator.hpp — the streaming state of every query measure: batches of
// whole queries in, one value per query kept, shards merged exactly.
//
//   auto acc = heldout::measure::ndcg{.k = 10}.accumulator();
//   acc.add(heldout::by_query(query, relevance), scores);            // a batch of whole queries
//   acc.add(heldout::by_query(query2, relevance2), scores2, weights2); // per-query weights, one per row
//   other.merge(acc);                                                // shards: exact
//   double mean = acc.value();                                       // over the scored queries
//   for (const heldout::query_value& q : acc.per_query()) ...        // q.query, q.value, q.weight
//   acc.skipped();                                                   // ids of queries left out
//
// The unit is the query: each batch holds whole queries (its rows of one query need not be
// contiguous), and a query id that comes again in a later batch or another shard is another
// query (a repeated evaluation, as in repeated cross-validation). Each query's value is
// computed when its batch is added; the state keeps (query, value, weight) per scored query
// in the order of first appearance, and the ids of the skipped ones. value() is the weighted
// mean Σ w_q v_q / Σ w_q over the scored queries (w_q = 1 without weights), summed in that
// order with a compensated sum, so that merging shards in order equals one pass over their
// batches bit for bit.
//
// Weights are per query: a floating-point column with one weight per row, equal on the rows
// of one query (input_error naming the first row that differs). Integral weights are not
// taken: bootstrap counts of rows must not pass for query weights.
//
// Errors (input_error naming the measure, argument and row): sizes that differ, a score that
// is not finite, a relevance that is negative or not finite (or above 1023 with the
// exponential gain), a weight that is negative, not finite or not constant within its query,
// a cutoff k = 0 where the measure needs one. value() throws undefined_error when no query
// was scored (none added, or none with a relevant item for the measures that need one), or
// the scored queries have zero total weight. merge() refuses the state of another measure
// (state_error).
//
// State in bytes (heldout::serialize / deserialize, stream/serialize.hpp): the measure's
// parameters (those of k, gain, no_relevant it has), its name() (the identity: the query
// measures carry no `key`, so the name, which shows the type and every non-default
// parameter, is compared on load), then the scored (query, value, weight) triples, the
// skipped ids, the row count and the weighted flag. check_state() refuses a name that is not
// the loaded measure's, parameters the measure refuses, values or weights that are negative or
// not finite, weights other than 1 in an unweighted state, and fewer rows than queries.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/query_rank.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/query/gains.hpp>
#include <heldout/query/judgements.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// One scored query: its id, the measure's value on it, and its weight.
struct query_value {
    std::int64_t query = 0;
    double value = 0;
    double weight = 1;
    friend bool operator==(const query_value&, const query_value&) = default;

    /// Serialisation (stream/serialize.hpp): the three fields in order.
    template <class F>
    void visit_state(F&& f) {
        f(query);
        f(value);
        f(weight);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(query);
        f(value);
        f(weight);
    }
};

namespace detail {

/// What a query measure provides to the accumulator.
template <class M>
concept query_measure_parts = requires(const M& m, std::span<const double> s, std::span<const double> r,
                                       query_workspace& ws, std::string_view who) {
    { m.of_query(s, r, ws) } -> std::same_as<std::optional<double>>;
    m.validate(who);
};

template <class M>
constexpr bool counts_empty_as_zero(const M& m) {
    if constexpr (requires { m.no_relevant; })
        return m.no_relevant == if_no_relevant::zero;
    else
        return false;
}

} // namespace detail

/// The accumulator of a query measure M (see the header comment).
template <class M>
class query_accumulator {
public:
    query_accumulator() : name_(m_.name()) {}
    explicit query_accumulator(const M& m) : m_(m), name_(m_.name()) {}

    /// Adds a batch of whole queries.
    template <class Q, class R, real_range P>
    void add(const query_judgements<Q, R>& truth, const P& scores) {
        add_batch(truth, values_of(scores, "heldout::query_accumulator", "scores"), std::span<const double>{}, false);
    }

    /// Adds a batch of whole queries with per-query weights (one per row, equal within a query).
    template <class Q, class R, real_range P, real_range W>
    void add(const query_judgements<Q, R>& truth, const P& scores, const W& weights) {
        add_batch(truth, values_of(scores, "heldout::query_accumulator", "scores"),
                  values_of(weights, "heldout::query_accumulator", "weights"), true);
    }

    /// Appends the queries of another shard of the same measure (after this one's).
    void merge(const query_accumulator& o) {
        if (!same_measure(m_, o.m_))
            detail::fail_state("measure " + m_.name(), "other",
                               "cannot merge the state of measure " + o.m_.name() + " (another measure or parameters)");
        scored_.insert(scored_.end(), o.scored_.begin(), o.scored_.end());
        skipped_.insert(skipped_.end(), o.skipped_.begin(), o.skipped_.end());
        rows_ += o.rows_;
        weighted_ = weighted_ || o.weighted_;
    }

    /// The weighted mean over the scored queries (undefined_error when there is none).
    double value() const {
        if (scored_.empty())
            detail::fail_undefined("measure " + m_.name(), skipped_.empty()
                                                               ? std::string("no query added")
                                                               : "no query has a relevant item (" +
                                                                     std::to_string(skipped_.size()) + " skipped)");
        detail::compensated_sum num, den;
        for (const auto& q : scored_) {
            num.add(q.weight * q.value);
            den.add(q.weight);
        }
        if (!(den.value() > 0))
            detail::fail_undefined("measure " + m_.name(), "the scored queries have zero total weight");
        return num.value() / den.value();
    }

    /// Forgets every query (buffers are kept).
    void reset() noexcept {
        scored_.clear();
        skipped_.clear();
        rows_ = 0;
        weighted_ = false;
    }

    const M& measure() const noexcept { return m_; }
    /// The scored queries, in order of first appearance (batch after batch).
    std::span<const query_value> per_query() const noexcept { return scored_; }
    /// The ids of the queries left out (no relevant item, for a measure undefined there).
    std::span<const std::int64_t> skipped() const noexcept { return skipped_; }
    /// Rows added.
    std::size_t rows() const noexcept { return rows_; }
    /// Whether a weighted batch was added.
    bool weighted() const noexcept { return weighted_; }

    /// Serialisation: parameters, identity, then the state (see the header comment).
    template <class F>
    void visit_state(F&& f) {
        visit_parameters(m_, f);
        f(name_);
        f(scored_);
        f(skipped_);
        f(rows_);
        f(weighted_);
    }
    template <class F>
    void visit_state(F&& f) const {
        visit_parameters(m_, f);
        f(name_);
        f(scored_);
        f(skipped_);
        f(rows_);
        f(weighted_);
    }

    /// A state read from bytes: every invariant add() and merge() keep.
    void check_state() const {
        if constexpr (requires { m_.gain; })
            if (m_.gain != gain::exponential && m_.gain != gain::linear)
                detail::fail_loaded("gain", "is not a heldout::gain");
        if constexpr (requires { m_.no_relevant; })
            if (m_.no_relevant != if_no_relevant::skip && m_.no_relevant != if_no_relevant::zero)
                detail::fail_loaded("no_relevant", "is not a heldout::if_no_relevant");
        detail::check_loaded_parameters("measure", [&] { m_.validate("measure " + m_.name()); });
        if (name_ != m_.name())
            detail::fail_loaded("measure", "the bytes hold the state of '" + name_ + "', not of '" + m_.name() + "'");
        for (std::size_t i = 0; i < scored_.size(); ++i) {
            const query_value& q = scored_[i];
            if (!std::isfinite(q.value) || q.value < 0)
                detail::fail_loaded("per_query",
                                    "value of element " + std::to_string(i) + " is negative or not finite");
            if (!std::isfinite(q.weight) || q.weight < 0)
                detail::fail_loaded("per_query",
                                    "weight of element " + std::to_string(i) + " is negative or not finite");
            if (!weighted_ && q.weight != 1)
                detail::fail_loaded("per_query",
                                    "weight of element " + std::to_string(i) + " is not 1 in a state without weights");
        }
        // Every query has at least one row.
        if (rows_ < scored_.size() + skipped_.size())
            detail::fail_loaded("rows", "is " + std::to_string(rows_) + ", fewer than the " +
                                            std::to_string(scored_.size() + skipped_.size()) + " queries held");
    }

private:
    /// The parameters the query measures have (a measure with others would need them here).
    template <class Me, class F>
    static void visit_parameters(Me& m, F& f) {
        if constexpr (requires { m.k; })
            f(m.k);
        if constexpr (requires { m.gain; })
            f(m.gain);
        if constexpr (requires { m.no_relevant; })
            f(m.no_relevant);
    }

    template <class Q, class R, class S, class W>
    void add_batch(const query_judgements<Q, R>& truth, std::span<const S> s, std::span<const W> w, bool weighted) {
        static_assert(std::integral<Q>, "heldout: query ids are integers");
        static_assert(detail::is_number_v<R>, "heldout: relevance is a number");
        static_assert(detail::query_measure_parts<M>, "heldout: a query measure has of_query(scores, relevance, "
                                                      "workspace) and validate(who)");
        const std::string who = "measure " + m_.name();
        const std::size_t n = truth.query.size();
        detail::check_same_size(who, "relevance", n, truth.relevance.size(), "query");
        detail::check_same_size(who, "scores", n, s.size(), "query");
        if (weighted)
            detail::check_same_size(who, "weights", n, w.size(), "query");
        m_.validate(who);
        if (n == 0)
            return;
        if (!detail::all_finite(s)) // a vectorised pass first; the slow one only to name the row
            detail::check_finite(who, "scores", s);
        check_relevance(who, truth.relevance);
        if (weighted)
            detail::check_weights(who, w);
        detail::group_queries(truth.query, groups_, who);

        // Every query is scored into pending_ first: a bad batch changes nothing.
        pending_.clear();
        pending_skipped_.clear();
        for (std::size_t g = 0; g < groups_.size(); ++g) {
            const std::size_t first = groups_.offsets[g], count = groups_.offsets[g + 1] - first;
            double weight = 1;
            std::optional<double> v;
            if (groups_.contiguous()) {
                if (weighted)
                    weight = query_weight(who, w, first, count, nullptr, groups_.ids[g]);
                v = m_.of_query(s.subspan(first, count), truth.relevance.subspan(first, count), ws_);
            } else {
                const std::size_t* rows = groups_.rows.data() + first;
                ws_.gathered_scores.resize(count);
                ws_.gathered_relevance.resize(count);
                for (std::size_t i = 0; i < count; ++i) {
                    ws_.gathered_scores[i] = static_cast<double>(s[rows[i]]);
                    ws_.gathered_relevance[i] = static_cast<double>(truth.relevance[rows[i]]);
                }
                if (weighted)
                    weight = query_weight(who, w, first, count, rows, groups_.ids[g]);
                v = m_.of_query(std::span<const double>(ws_.gathered_scores),
                                std::span<const double>(ws_.gathered_relevance), ws_);
            }
            if (!v && detail::counts_empty_as_zero(m_))
                v = 0.0;
            if (v)
                pending_.push_back({groups_.ids[g], *v, weight});
            else
                pending_skipped_.push_back(groups_.ids[g]);
        }
        scored_.insert(scored_.end(), pending_.begin(), pending_.end());
        skipped_.insert(skipped_.end(), pending_skipped_.begin(), pending_skipped_.end());
        rows_ += n;
        weighted_ = weighted_ || weighted;
    }

    template <class R>
    void check_relevance(const std::string& who, std::span<const R> rel) const {
        bool exponential = false;
        if constexpr (requires { m_.gain; })
            exponential = m_.gain == gain::exponential;
        if constexpr (std::is_integral_v<R>) {
            // Small unsigned types cannot be wrong; others are scanned for their extremes first.
            if constexpr (std::is_unsigned_v<R> && std::numeric_limits<R>::max() <= 1023)
                return;
            R lo = rel.empty() ? R(0) : rel[0], hi = lo;
            for (const R r : rel) {
                lo = std::min(lo, r);
                hi = std::max(hi, r);
            }
            if (lo >= R(0) && (!exponential || static_cast<double>(hi) <= max_exponential_relevance))
                return;
        } else {
            bool ok = true;
            for (const R r : rel)
                ok &= r >= R(0) && r <= R(1e300); // false for NaN and infinity too
            if (ok && !exponential)
                return;
        }
        for (std::size_t i = 0; i < rel.size(); ++i) {
            if constexpr (std::is_floating_point_v<R>) {
                if (!std::isfinite(rel[i]))
                    detail::fail_at(who, "relevance", std::isnan(rel[i]) ? "not finite (nan)" : "not finite (inf)", i);
            }
            if constexpr (std::is_signed_v<R>) {
                if (rel[i] < R(0))
                    detail::fail_at(who, "relevance",
                                    "negative relevance " + detail::number_text(static_cast<double>(rel[i])), i);
            }
            if (exponential && static_cast<double>(rel[i]) > max_exponential_relevance)
                detail::fail_at(who, "relevance",
                                "relevance " + detail::number_text(static_cast<double>(rel[i])) +
                                    " above 1023: the exponential gain 2^rel - 1 overflows (use gain::linear)",
                                i);
        }
    }

    /// The weight of a query: equal on all its rows.
    template <class W>
    static double query_weight(const std::string& who, std::span<const W> w, std::size_t first, std::size_t count,
                               const std::size_t* rows, std::int64_t id) {
        const std::size_t r0 = rows ? rows[0] : first;
        const W w0 = w[r0];
        for (std::size_t i = 1; i < count; ++i) {
            const std::size_t r = rows ? rows[i] : first + i;
            if (w[r] != w0)
                detail::fail_at(who, "weights",
                                "weight " + detail::number_text(static_cast<double>(w[r])) + " differs from " +
                                    detail::number_text(static_cast<double>(w0)) + " on the first row of query " +
                                    std::to_string(id) + " (row " + std::to_string(r0) + "): weights are per query",
                                r);
        }
        return static_cast<double>(w0);
    }

    M m_{};
    std::string name_; // m_.name(), kept for the bytes (see visit_state)
    std::vector<query_value> scored_;
    std::vector<std::int64_t> skipped_;
    std::size_t rows_ = 0;
    bool weighted_ = false;
    // scratch, kept across batches
    detail::query_groups groups_;
    detail::query_workspace ws_;
    std::vector<query_value> pending_;
    std::vector<std::int64_t> pending_skipped_;
};

HELDOUT_NAMESPACE_END
