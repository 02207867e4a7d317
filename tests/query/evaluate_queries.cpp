// Tests for heldout/query/evaluate_queries.hpp: per-query results against the numpy reference
// (tests/reference/ref_query.py), grouping of non-contiguous queries, the skipped-query policy,
// per-query weights, printing.
#include <heldout/query.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <sstream>
#include <string>
#include <vector>

using heldout::evaluate_queries;
namespace m = heldout::measure;

namespace {

struct ref_case {
    std::vector<std::int64_t> query;
    std::vector<int> relevance;
    std::vector<double> scores;
    std::vector<double> weights;
};

ref_case load(const heldout_test::reference_table& t, int c) {
    const std::string p = "case" + std::to_string(c) + ".";
    ref_case r;
    for (const double x : t.get(p + "query"))
        r.query.push_back(static_cast<std::int64_t>(x));
    for (const double x : t.get(p + "relevance"))
        r.relevance.push_back(static_cast<int>(x));
    r.scores = t.get(p + "scores");
    r.weights = t.get(p + "weights");
    return r;
}

template <class M>
void check_against(const heldout_test::reference_table& t, int c, const std::string& name, const M& measure) {
    const auto d = load(t, c);
    const std::string p = "case" + std::to_string(c) + "." + name + ".";
    INFO("case ", c, " measure ", name);
    const auto r = evaluate_queries(measure, d.query, d.relevance, d.scores);
    const auto& ids = t.get(p + "ids");
    const auto& vals = t.get(p + "values");
    const auto& skipped = t.get(p + "skipped");
    REQUIRE(r.per_query.size() == ids.size());
    for (std::size_t i = 0; i < ids.size(); ++i) {
        CHECK(r.per_query[i].query == static_cast<std::int64_t>(ids[i]));
        CHECK(r.per_query[i].value == doctest::Approx(vals[i]).epsilon(1e-12));
    }
    REQUIRE(r.skipped.size() == skipped.size());
    for (std::size_t i = 0; i < skipped.size(); ++i)
        CHECK(r.skipped[i] == static_cast<std::int64_t>(skipped[i]));
    CHECK(r.mean == doctest::Approx(t.scalar(p + "mean")).epsilon(1e-12));
    const auto w = evaluate_queries(measure, d.query, d.relevance, d.scores, d.weights);
    CHECK(w.mean == doctest::Approx(t.scalar(p + "weighted_mean")).epsilon(1e-12));
    CHECK(w.weighted);
}

} // namespace

TEST_SUITE("query/evaluate_queries") {
    TEST_CASE("numpy reference (ref_query.py: pairwise tie expectations, shuffled rows): every measure, 4 cases") {
        const heldout_test::reference_table t("ref_query");
        for (int c = 0; c < 4; ++c) {
            check_against(t, c, "ndcg5", m::ndcg{.k = 5});
            check_against(t, c, "ndcg0_linear", m::ndcg{.k = 0, .gain = heldout::gain::linear});
            check_against(t, c, "dcg10", m::dcg{.k = 10});
            check_against(t, c, "p5", m::precision_at{.k = 5});
            check_against(t, c, "r5", m::recall_at{.k = 5});
            check_against(t, c, "rr", m::reciprocal_rank{});
            check_against(t, c, "ap0", m::average_precision_at{.k = 0});
            check_against(t, c, "ap10", m::average_precision_at{.k = 10});
        }
    }

    TEST_CASE("rows of a query need not be contiguous: same per-query values as the grouped rows") {
        // Query 5: rows 0, 2, 4; query -3: rows 1, 3. Grouped copy: [5, 5, 5, -3, -3].
        const std::vector<int> q{5, -3, 5, -3, 5}, rel{2, 0, 0, 1, 1};
        const std::vector<double> s{.9, .4, .2, .6, .5};
        const std::vector<int> qg{5, 5, 5, -3, -3}, relg{2, 0, 1, 0, 1};
        const std::vector<double> sg{.9, .2, .5, .4, .6};
        const auto a = evaluate_queries(m::ndcg{.k = 2}, q, rel, s);
        const auto b = evaluate_queries(m::ndcg{.k = 2}, qg, relg, sg);
        REQUIRE(a.per_query.size() == 2);
        CHECK(a.per_query == b.per_query);
        CHECK(a.per_query[0].query == 5); // order of first appearance
        CHECK(a.per_query[1].query == -3);
        // Query -3: the relevant item ranked first: NDCG@2 = 1.
        CHECK(a.per_query[1].value == 1.0);
    }

    TEST_CASE("skipped queries: left out of mean and per_query, listed; or counted 0 on request") {
        const std::vector<int> q{1, 1, 2, 2, 3, 3}, rel{1, 0, 0, 0, 0, 2};
        const std::vector<double> s{.9, .1, .5, .4, .8, .2};
        const auto r = evaluate_queries(m::reciprocal_rank{}, q, rel, s);
        CHECK(r.per_query.size() == 2);
        REQUIRE(r.skipped.size() == 1);
        CHECK(r.skipped[0] == 2);
        CHECK(r.mean == doctest::Approx((1.0 + 0.5) / 2).epsilon(1e-15));
        std::ostringstream os;
        os << r;
        CHECK(os.str() == "reciprocal rank 0.75 over 2 queries; 1 query with no relevant item skipped; 6 rows");
        const auto z = evaluate_queries(m::reciprocal_rank{.no_relevant = heldout::if_no_relevant::zero}, q, rel, s);
        CHECK(z.per_query.size() == 3);
        CHECK(z.skipped.empty());
        CHECK(z.mean == doctest::Approx(0.5).epsilon(1e-15));
        std::ostringstream oz;
        oz << z;
        CHECK(
            oz.str() ==
            "reciprocal rank (no relevant item = 0) 0.5 over 3 queries; queries with no relevant item count 0; 6 rows");
        const auto d = evaluate_queries(m::dcg{.k = 1}, q, rel, s);
        CHECK(d.per_query.size() == 3);
        std::ostringstream od;
        od << d;
        CHECK(od.str().find("queries with no relevant item count (the measure is 0 there)") != std::string::npos);
        // Every query without a relevant item: the mean is undefined.
        const std::vector<int> none{0, 0, 0, 0, 0, 0};
        CHECK_THROWS_AS(evaluate_queries(m::ndcg{}, q, none, s), heldout::undefined_error);
    }

    TEST_CASE("per-query weights: weighted mean; weights must be equal within a query") {
        const std::vector<int> q{1, 1, 2, 2}, rel{1, 0, 0, 1};
        const std::vector<double> s{.9, .1, .5, .4}, w{3, 3, 1, 1};
        // RR: query 1 -> 1, query 2 -> 1/2; weighted (3 * 1 + 1 * 0.5) / 4 = 0.875.
        CHECK(evaluate_queries(m::reciprocal_rank{}, q, rel, s, w).mean == doctest::Approx(0.875).epsilon(1e-15));
        const std::vector<double> bad{3, 3, 1, 2};
        try {
            (void)evaluate_queries(m::reciprocal_rank{}, q, rel, s, bad);
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(e.argument() == "weights");
            REQUIRE(e.index());
            CHECK(*e.index() == 3);
        }
    }

    TEST_CASE("bad input names the argument and the row") {
        const std::vector<int> q{1, 1, 2, 2}, rel{1, 0, 0, 1}, neg{1, 0, -2, 1};
        const std::vector<double> s{.9, .1, .5, .4}, nan_s{.9, .1, std::nan(""), .4};
        auto expect = [](auto&& f, const std::string& arg, std::size_t index) {
            try {
                f();
                FAIL("no error");
            } catch (const heldout::undefined_error&) {
                FAIL("undefined_error where input_error was due");
            } catch (const heldout::input_error& e) {
                CHECK(e.argument() == arg);
                REQUIRE(e.index());
                CHECK(*e.index() == index);
            }
        };
        expect([&] { (void)evaluate_queries(m::ndcg{}, q, rel, nan_s); }, "scores", 2);
        expect([&] { (void)evaluate_queries(m::ndcg{}, q, neg, s); }, "relevance", 2);
        const std::vector<double> big{1, 0, 1024, 1};
        expect([&] { (void)evaluate_queries(m::ndcg{}, q, big, s); }, "relevance", 2);
        // The linear gain takes it.
        CHECK_NOTHROW((void)evaluate_queries(m::ndcg{.gain = heldout::gain::linear}, q, big, s));
        const std::vector<double> short_s{.9, .1, .5};
        CHECK_THROWS_WITH_AS((void)evaluate_queries(m::ndcg{}, q, rel, short_s),
                             "measure NDCG@10: argument 'scores': size 3 differs from size 4 of 'query'",
                             heldout::input_error);
        const std::vector<int> empty;
        const std::vector<double> empty_s;
        CHECK_THROWS_AS((void)evaluate_queries(m::ndcg{}, empty, empty, empty_s), heldout::input_error);
    }
}
