// Tests for heldout/query/accumulator.hpp: batches of whole queries, exact merge of shards,
// reset, state of another measure refused.
#include <heldout/query.hpp>

#include <doctest/doctest.h>

#include <algorithm>
#include <cstdint>
#include <limits>
#include <random>
#include <span>
#include <vector>

using heldout::by_query;
namespace m = heldout::measure;

namespace {
struct query_rows {
    std::vector<std::int64_t> q;
    std::vector<int> rel;
    std::vector<float> s;
    std::vector<std::size_t> query_start; // first row of each query (contiguous)
};

query_rows make_queries(std::uint32_t seed, std::size_t queries) {
    std::mt19937 g(seed);
    query_rows d;
    for (std::size_t i = 0; i < queries; ++i) {
        d.query_start.push_back(d.q.size());
        const std::size_t n = std::uniform_int_distribution<std::size_t>(1, 40)(g);
        for (std::size_t j = 0; j < n; ++j) {
            d.q.push_back(static_cast<std::int64_t>(i * 7 + 3));
            d.rel.push_back(std::uniform_int_distribution<int>(0, 6)(g) / 3);
            d.s.push_back(static_cast<float>(std::uniform_int_distribution<int>(0, 9)(g)) / 8.0f);
        }
    }
    d.query_start.push_back(d.q.size());
    return d;
}

template <class M>
void check_shards(const M& measure, const query_rows& d) {
    auto one = measure.accumulator();
    one.add(by_query(d.q, d.rel), d.s);
    // Three shards of whole queries, of two batches each.
    const std::size_t Q = d.query_start.size() - 1;
    const std::size_t cuts[] = {0, Q / 6, Q / 3, Q / 2, 2 * Q / 3, 5 * Q / 6, Q};
    std::vector<heldout::query_accumulator<M>> shards(3, measure.accumulator());
    for (std::size_t b = 0; b < 6; ++b) {
        const std::size_t first = d.query_start[cuts[b]], last = d.query_start[cuts[b + 1]];
        const std::span<const std::int64_t> q(d.q.data() + first, last - first);
        const std::span<const int> r(d.rel.data() + first, last - first);
        const std::span<const float> s(d.s.data() + first, last - first);
        shards[b / 2].add(by_query(q, r), s);
    }
    shards[0].merge(shards[1]);
    shards[0].merge(shards[2]);
    CHECK(shards[0].value() == one.value()); // bit for bit
    CHECK(std::equal(shards[0].per_query().begin(), shards[0].per_query().end(), one.per_query().begin(),
                     one.per_query().end()));
    CHECK(
        std::equal(shards[0].skipped().begin(), shards[0].skipped().end(), one.skipped().begin(), one.skipped().end()));
    CHECK(shards[0].rows() == one.rows());
}
} // namespace

TEST_SUITE("query/accumulator") {
    TEST_CASE("merging shards of whole queries equals one pass, bit for bit, for every query measure") {
        const auto d = make_queries(31, 300);
        check_shards(m::ndcg{.k = 10}, d);
        check_shards(m::dcg{.k = 0}, d);
        check_shards(m::precision_at{.k = 3}, d);
        check_shards(m::recall_at{.k = 3}, d);
        check_shards(m::reciprocal_rank{}, d);
        check_shards(m::average_precision_at{.k = 0}, d);
    }

    TEST_CASE("reset forgets, a bad batch changes nothing, another measure's state is refused") {
        const auto d = make_queries(5, 20);
        auto acc = m::ndcg{}.accumulator();
        acc.add(by_query(d.q, d.rel), d.s);
        const double v = acc.value();
        const std::size_t n = acc.per_query().size();
        std::vector<float> bad = d.s;
        bad.back() = std::numeric_limits<float>::infinity();
        CHECK_THROWS_AS(acc.add(by_query(d.q, d.rel), bad), heldout::input_error);
        CHECK(acc.per_query().size() == n);
        CHECK(acc.value() == v);
        auto other = m::ndcg{.k = 5}.accumulator();
        CHECK_THROWS_AS(acc.merge(other), heldout::state_error);
        acc.reset();
        CHECK(acc.per_query().empty());
        CHECK_THROWS_WITH_AS(acc.value(), "measure NDCG@10: undefined: no query added", heldout::undefined_error);
    }

    TEST_CASE("heldout::evaluate on by_query equals the accumulator's mean") {
        const auto d = make_queries(9, 50);
        auto acc = m::average_precision_at{.k = 5}.accumulator();
        acc.add(by_query(d.q, d.rel), d.s);
        CHECK(heldout::evaluate(m::average_precision_at{.k = 5}, by_query(d.q, d.rel), d.s) == acc.value());
    }
}
