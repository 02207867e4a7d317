// Tests for the state in bytes of the query measures' accumulator (query/accumulator.hpp,
// stream/serialize.hpp): every query measure's state round-trips byte for byte (weighted and
// not, with skipped queries), the loaded state scores and merges as the original, and bytes
// with a right checksum but inconsistent content are refused by deserialize naming the field.
#include <heldout/query.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/text.hpp"
#include <doctest/doctest.h>

#include <cstdint>
#include <cstring>
#include <string>
#include <string_view>
#include <vector>

namespace {
namespace hm = heldout::measure;

// Three queries interleaved (rows of 5 and 7 alternate), query 9 without a relevant item,
// tied scores, per-query weights.
const std::vector<int> query = {5, 7, 5, 7, 5, 9, 9, 7, 5};
const std::vector<int> relevance = {3, 0, 0, 2, 1, 0, 0, 1, 0};
const std::vector<double> scores = {0.9, 0.4, 0.9, 0.8, 0.1, 0.3, 0.2, 0.4, 0.5};
const std::vector<double> weights = {2, 0.5, 2, 0.5, 2, 1, 1, 0.5, 2};

template <class M>
void check_round_trip(const M& m, bool weighted) {
    INFO(m.name() << (weighted ? " weighted" : ""));
    auto acc = m.accumulator();
    if (weighted)
        acc.add(heldout::by_query(query, relevance), scores, weights);
    else
        acc.add(heldout::by_query(query, relevance), scores);
    const auto bytes = heldout::serialize(acc);
    const auto back = heldout::deserialize<decltype(acc)>(bytes);
    CHECK(heldout::serialize(back) == bytes);
    CHECK(back.measure() == m);
    CHECK(back.rows() == acc.rows());
    CHECK(back.weighted() == weighted);
    REQUIRE(back.per_query().size() == acc.per_query().size());
    for (std::size_t i = 0; i < acc.per_query().size(); ++i)
        CHECK(back.per_query()[i] == acc.per_query()[i]);
    CHECK(std::vector<std::int64_t>(back.skipped().begin(), back.skipped().end()) ==
          std::vector<std::int64_t>(acc.skipped().begin(), acc.skipped().end()));
    const double a = acc.value(), b = back.value();
    CHECK(std::memcmp(&a, &b, sizeof a) == 0);
    // The loaded state merges as the original: a merge of two loads equals two batches.
    auto twice = back;
    twice.merge(heldout::deserialize<decltype(acc)>(bytes));
    auto fed = acc;
    if (weighted)
        fed.add(heldout::by_query(query, relevance), scores, weights);
    else
        fed.add(heldout::by_query(query, relevance), scores);
    CHECK(heldout::serialize(twice) == heldout::serialize(fed));
    // An empty state round-trips too.
    const auto empty = m.accumulator();
    CHECK(heldout::serialize(heldout::deserialize<decltype(acc)>(heldout::serialize(empty))) ==
          heldout::serialize(empty));
}

/// The fields of an NDCG accumulator's state, in its visit order, to forge bytes from.
struct ndcg_mirror {
    std::uint64_t k = 10;
    std::uint8_t gain = 0, no_relevant = 0;
    struct id {
        static constexpr std::string_view key = "query_ndcg";
    };
    id measure() const { return {}; }
    std::vector<heldout::query_value> scored = {{5, 0.75, 1}, {7, 0.5, 1}};
    std::vector<std::int64_t> skipped = {9};
    std::uint64_t rows = 9;
    bool weighted = false;
    template <class F>
    void visit_state(F&& f) const {
        f(k), f(gain), f(no_relevant), f(scored), f(skipped), f(rows), f(weighted);
    }
};

/// The same for precision at k (one parameter).
struct precision_mirror {
    std::uint64_t k = 3;
    struct id {
        static constexpr std::string_view key = "query_precision_at";
    };
    id measure() const { return {}; }
    std::vector<heldout::query_value> scored = {{5, 1.0 / 3.0, 1}};
    std::vector<std::int64_t> skipped;
    std::uint64_t rows = 4;
    bool weighted = false;
    template <class F>
    void visit_state(F&& f) const {
        f(k), f(scored), f(skipped), f(rows), f(weighted);
    }
};

/// NDCG's layout under P@k's key: passes the key check, fails the layout check.
struct ndcg_layout_precision_key : ndcg_mirror {
    precision_mirror::id measure() const { return {}; }
};

template <class A, class Mirror>
std::string load_error(const Mirror& mirror) {
    try {
        (void)heldout::deserialize<A>(heldout::serialize(mirror));
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}
using heldout_test::has;

using ndcg_acc = heldout::query_accumulator<hm::ndcg>;
using precision_acc = heldout::query_accumulator<hm::precision_at>;
} // namespace

TEST_SUITE("stream/query_state") {
    TEST_CASE("every query measure's state round-trips byte for byte, weighted or not") {
        for (bool w : {false, true}) {
            check_round_trip(hm::ndcg{.k = 3}, w);
            check_round_trip(
                hm::ndcg{.k = 0, .gain = heldout::gain::linear, .no_relevant = heldout::if_no_relevant::zero}, w);
            check_round_trip(hm::dcg{.k = 2}, w);
            check_round_trip(hm::precision_at{.k = 2}, w);
            check_round_trip(hm::recall_at{.k = 3, .no_relevant = heldout::if_no_relevant::zero}, w);
            check_round_trip(hm::reciprocal_rank{}, w);
            check_round_trip(hm::average_precision_at{.k = 0}, w);
        }
    }

    TEST_CASE("parameters travel: a loaded NDCG@3 with linear gain is that measure") {
        const hm::ndcg m{.k = 3, .gain = heldout::gain::linear};
        auto acc = m.accumulator();
        acc.add(heldout::by_query(query, relevance), scores);
        const auto back = heldout::deserialize<ndcg_acc>(heldout::serialize(acc));
        CHECK(back.measure() == m);
        CHECK(back.measure().name() == m.name());
    }

    TEST_CASE("a mirror of a valid state loads (the mirror has the accumulator's layout)") {
        CHECK(load_error<ndcg_acc>(ndcg_mirror{}) == "no error");
        CHECK(load_error<precision_acc>(precision_mirror{}) == "no error");
        // Its value: (0.75 + 0.5) / 2, worked by hand from the mirror's two scored queries.
        CHECK(heldout::deserialize<ndcg_acc>(heldout::serialize(ndcg_mirror{})).value() == 0.625);
    }

    TEST_CASE("another measure with the same layout is refused by its key") {
        // P@k and reciprocal rank both hold one unsigned parameter: the layout alone agrees.
        precision_mirror p;
        p.k = 1;
        const auto e = load_error<heldout::query_accumulator<hm::reciprocal_rank>>(p);
        INFO(e);
        CHECK(has(e, "query_precision_at"));
        CHECK(has(e, "query_reciprocal_rank"));
    }

    TEST_CASE("typed load: other parameters are refused") {
        auto acc = hm::ndcg{.k = 10}.accumulator();
        acc.add(heldout::by_query(query, relevance), scores);
        const auto bytes = heldout::serialize(acc);
        CHECK(heldout::deserialize(bytes, hm::ndcg{.k = 10}).value() == acc.value());
        CHECK_THROWS_AS((void)heldout::deserialize(bytes, hm::ndcg{.k = 5}), heldout::input_error);
    }

    TEST_CASE("parameters out of range and unknown enumerators are refused") {
        precision_mirror p;
        p.k = 0;
        CHECK(has(load_error<precision_acc>(p), "out of range"));
        ndcg_mirror g;
        g.gain = 7;
        CHECK(has(load_error<ndcg_acc>(g), "gain"));
        ndcg_mirror r;
        r.no_relevant = 9;
        CHECK(has(load_error<ndcg_acc>(r), "no_relevant"));
    }

    TEST_CASE("per-query values and weights: negative, not finite, or not 1 without weights") {
        ndcg_mirror v;
        v.scored[1].value = std::numeric_limits<double>::quiet_NaN();
        CHECK(has(load_error<ndcg_acc>(v), "value of element 1 is negative or not finite"));
        ndcg_mirror n;
        n.scored[0].value = -0.25;
        CHECK(has(load_error<ndcg_acc>(n), "value of element 0"));
        ndcg_mirror w;
        w.weighted = true;
        w.scored[0].weight = -1;
        CHECK(has(load_error<ndcg_acc>(w), "weight of element 0 is negative or not finite"));
        ndcg_mirror i;
        i.weighted = true;
        i.scored[1].weight = std::numeric_limits<double>::infinity();
        CHECK(has(load_error<ndcg_acc>(i), "weight of element 1"));
        ndcg_mirror u;
        u.scored[1].weight = 2;
        CHECK(has(load_error<ndcg_acc>(u), "is not 1 in a state without weights"));
    }

    TEST_CASE("fewer rows than queries are refused") {
        ndcg_mirror m;
        m.rows = 2; // three queries held (two scored, one skipped)
        CHECK(has(load_error<ndcg_acc>(m), "rows"));
        CHECK(has(load_error<ndcg_acc>(m), "fewer than the 3 queries held"));
    }

    TEST_CASE("bytes of another measure or layout are refused") {
        CHECK(has(load_error<precision_acc>(ndcg_mirror{}), "query_ndcg")); // by the key first
        // the right key over NDCG's layout: refused by the layout
        CHECK(has(load_error<precision_acc>(ndcg_layout_precision_key{}), "different accumulator type or layout"));
    }
}
