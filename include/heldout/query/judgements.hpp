// heldout/query/judgements.hpp — the truth of a ranking by query: which query each row
// belongs to and its graded relevance, seen together as one input without copying.
//
//   std::vector<int> query = {7, 7, 7, 9, 9};          // any integers; rows of a query need not be contiguous
//   std::vector<int> rel = {3, 0, 1, 0, 2};            // graded relevance >= 0 (integers or reals)
//   std::vector<float> scores = {.9f, .2f, .5f, .1f, .7f};
//   double v = heldout::evaluate(heldout::measure::ndcg{.k = 10}, heldout::by_query(query, rel), scores);
//   agg.record(split, heldout::by_query(query_of_test_rows, rel_of_test_rows), scores);   // the aggregator
//
// The kinds of the query measures (core/kinds.hpp's open vocabulary):
//   kinds::graded_relevance  truth: query ids with a graded relevance per row (this view)
//   kinds::query_score       prediction: a real-valued score per row, higher = ranked first
// The aggregator records a query_judgements as a column of its own (query ids as int64,
// relevance as double), so query measures are tracked like any other (over splits grouped
// by query: kfold{...}.splits(heldout::groups(query))).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/columns.hpp>
#include <heldout/detail/validate.hpp>

#include <cstddef>
#include <cstdint>
#include <memory>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <typeindex>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Query ids (integral) and graded relevance (integral or floating point) of the same rows.
template <class Q, class R>
struct query_judgements {
    std::span<const Q> query;
    std::span<const R> relevance;
    std::size_t size() const noexcept { return query.size(); }
};

/// The view the aggregator keeps and query measures read back.
using recorded_judgements = query_judgements<std::int64_t, double>;

namespace kinds {
/// Query ids with a graded relevance per row (the truth of the query measures).
struct graded_relevance {
    static constexpr std::string_view name = "graded relevance within queries";
    using view = recorded_judgements;
};
/// A real-valued score per row, ranked within its query, higher first.
struct query_score {
    static constexpr std::string_view name = "ranking score within queries";
    using view = std::span<const double>;
};
} // namespace kinds

/// The judgements of rows: query ids (integral) and relevance, viewed without a copy.
template <label_range Q, value_range R>
query_judgements<element_t<Q>, element_t<R>> by_query(const Q& query, const R& relevance) {
    constexpr std::string_view who = "heldout::by_query";
    auto q = values_of(query, who, "query");
    auto r = values_of(relevance, who, "relevance");
    detail::check_same_size(who, "relevance", q.size(), r.size(), "query");
    return {q, r};
}

namespace detail {

/// The aggregator's column of query judgements: int64 ids and double relevance.
class judgements_column final : public column_base {
public:
    std::vector<std::int64_t> query;
    std::vector<double> relevance;

    std::unique_ptr<column_base> empty_copy() const override { return std::make_unique<judgements_column>(); }
    std::unique_ptr<column_base> clone() const override { return std::make_unique<judgements_column>(*this); }
    std::size_t rows() const noexcept override { return query.size(); }
    std::string describe() const override { return "query ids with graded relevance"; }
    bool same_layout(const column_base& o) const noexcept override {
        return dynamic_cast<const judgements_column*>(&o) != nullptr;
    }
    void append(const column_base& o) override {
        const auto& x = static_cast<const judgements_column&>(o);
        query.insert(query.end(), x.query.begin(), x.query.end());
        relevance.insert(relevance.end(), x.relevance.begin(), x.relevance.end());
    }
    void clear() noexcept override {
        query.clear();
        relevance.clear();
    }
    std::type_index view_type() const noexcept override { return typeid(recorded_judgements); }
    void view_into(std::size_t first, std::size_t count, void* out) const override {
        *static_cast<recorded_judgements*>(out) = {std::span<const std::int64_t>(query).subspan(first, count),
                                                   std::span<const double>(relevance).subspan(first, count)};
    }
    std::size_t cells() const noexcept override { return 2; }
    void write_cell(std::ostream& os, std::size_t row, std::size_t cell) const override {
        if (cell == 0)
            os << query[row];
        else
            os << number_text(relevance[row]);
    }
};

template <class T>
struct is_query_judgements : std::false_type {};
template <class Q, class R>
struct is_query_judgements<query_judgements<Q, R>> : std::true_type {};

} // namespace detail

/// The aggregator records query judgements as query ids (int64) and relevance (double).
template <class Q, class R>
struct column_traits<query_judgements<Q, R>> {
    using column = detail::judgements_column;
    static void append(column& c, const query_judgements<Q, R>& j, std::string_view who, std::string_view arg) {
        c.query.reserve(c.query.size() + j.size());
        c.relevance.reserve(c.relevance.size() + j.size());
        for (std::size_t i = 0; i < j.size(); ++i) {
            if constexpr (std::is_unsigned_v<Q> && sizeof(Q) >= sizeof(std::int64_t))
                if (j.query[i] > static_cast<Q>(INT64_MAX))
                    detail::fail_at(who, arg, "query id too large", i);
            c.query.push_back(static_cast<std::int64_t>(j.query[i]));
            c.relevance.push_back(static_cast<double>(j.relevance[i]));
        }
    }
};

HELDOUT_NAMESPACE_END
