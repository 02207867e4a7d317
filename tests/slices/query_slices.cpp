// Tests for heldout/slices/query_slices.hpp: estimate_slices for query measures — each slice
// is the query measure on its own rows (checked by evaluating those rows alone), slice versus
// the other queries by Welch's t, Holm across slices, the too-small rule in queries, the worst
// slice, Bonferroni, and bad input.
#include <heldout/compare/holm.hpp>
#include <heldout/query.hpp>
#include <heldout/slices/query_slices.hpp>

#include <doctest/doctest.h>

#include <boost/math/distributions/students_t.hpp>

#include <cmath>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

using heldout::estimate_slices;

namespace {
struct query_data {
    std::vector<int> query, market;
    std::vector<int> relevance;
    std::vector<double> score;
};
// 150 queries of 6 rows; market = query % 3 except queries 0..4, which form market 9 (5
// queries: too small). Scores follow relevance less closely in market 2. Queries 3 and 7 have
// no relevant item (NDCG skips them).
query_data make(std::uint64_t seed) {
    std::mt19937_64 g(seed);
    std::uniform_real_distribution<double> u;
    std::normal_distribution<double> z;
    query_data d;
    for (int q = 0; q < 150; ++q)
        for (int j = 0; j < 6; ++j) {
            const int market = q < 5 ? 9 : q % 3;
            const int rel = (q == 3 || q == 7) ? 0 : static_cast<int>(u(g) * 3);
            d.query.push_back(q);
            d.market.push_back(market);
            d.relevance.push_back(rel);
            d.score.push_back((market == 2 ? 0.2 : 1.0) * rel + z(g));
        }
    return d;
}
query_data rows_where(const query_data& d, int market, bool inside) {
    query_data s;
    for (std::size_t i = 0; i < d.query.size(); ++i)
        if ((d.market[i] == market) == inside) {
            s.query.push_back(d.query[i]);
            s.market.push_back(d.market[i]);
            s.relevance.push_back(d.relevance[i]);
            s.score.push_back(d.score[i]);
        }
    return s;
}
} // namespace

TEST_SUITE("slices/query_slices") {
    TEST_CASE("each slice is the query measure on its own rows; slice vs rest is Welch's t; Holm across slices") {
        const auto d = make(11);
        const heldout::measure::ndcg m{.k = 5};
        const auto all = heldout::evaluate_queries(m, d.query, d.relevance, d.score);
        const auto r = estimate_slices(all, d.query, d.market);
        REQUIRE(r.size() == 4);
        CHECK(r[0].slice == 0);
        CHECK(r[3].slice == 9);
        std::vector<double> p;
        for (std::size_t k = 0; k < 3; ++k) {
            CAPTURE(k);
            const int market = static_cast<int>(k);
            const auto in = rows_where(d, market, true), out = rows_where(d, market, false);
            // Independent route: evaluate the slice's rows alone, then estimate_queries.
            const auto ein =
                heldout::estimate_queries(heldout::evaluate_queries(m, in.query, in.relevance, in.score), 0.95);
            const auto eout =
                heldout::estimate_queries(heldout::evaluate_queries(m, out.query, out.relevance, out.score), 0.95);
            CHECK(r[k].rows == in.query.size());
            CHECK(r[k].class_rows.empty());
            CHECK_FALSE(r[k].too_small);
            CHECK(r[k].estimate.value == doctest::Approx(ein.value).epsilon(1e-14));
            REQUIRE(r[k].estimate.has_interval());
            CHECK(*r[k].estimate.lower == doctest::Approx(*ein.lower).epsilon(1e-13));
            CHECK(*r[k].estimate.upper == doctest::Approx(*ein.upper).epsilon(1e-13));
            CHECK(r[k].estimate.observations == ein.observations);
            REQUIRE(r[k].versus_rest);
            const auto& c = *r[k].versus_rest;
            CHECK(c.rest_value == doctest::Approx(eout.value).epsilon(1e-14));
            CHECK(c.difference == doctest::Approx(ein.value - eout.value).epsilon(1e-12));
            // Welch (1947): se^2 = s1^2 + s2^2, df = se^4 / (s1^4/(q1-1) + s2^4/(q2-1)), written out.
            const double s1 = *ein.se, s2 = *eout.se;
            const double q1 = static_cast<double>(ein.observations), q2 = static_cast<double>(eout.observations);
            const double se = std::sqrt(s1 * s1 + s2 * s2);
            const double df = std::pow(se, 4) / (std::pow(s1, 4) / (q1 - 1) + std::pow(s2, 4) / (q2 - 1));
            REQUIRE(c.df);
            CHECK(*c.df == doctest::Approx(df).epsilon(1e-12));
            const double t = (ein.value - eout.value) / se;
            CHECK(c.statistic == doctest::Approx(t).epsilon(1e-10));
            const boost::math::students_t_distribution<double> st(df);
            CHECK(c.p_value == doctest::Approx(2 * boost::math::cdf(st, -std::abs(t))).epsilon(1e-10));
            const double crit = boost::math::quantile(st, 0.975);
            CHECK(*c.lower == doctest::Approx(c.difference - crit * se).epsilon(1e-10));
            p.push_back(c.p_value);
        }
        const auto adj = heldout::holm_adjust(p);
        for (std::size_t k = 0; k < 3; ++k)
            CHECK(r[k].versus_rest->adjusted_p_value == doctest::Approx(adj[k]).epsilon(1e-14));
        // Market 2's scores follow relevance least: its NDCG is the lowest, marked worst.
        CHECK(r[2].worst);
        CHECK_FALSE(r[0].worst);
        CHECK(r[2].versus_rest->difference < 0);
        CHECK(r[2].estimate.notes.back().find("picking the worst of many") != std::string::npos);
    }
    TEST_CASE("too small: fewer than 20 scored queries, no interval, not compared") {
        const auto d = make(12);
        const heldout::measure::ndcg m{.k = 5};
        const auto all = heldout::evaluate_queries(m, d.query, d.relevance, d.score);
        const auto r = estimate_slices(all, d.query, d.market);
        const auto& small = r[3]; // market 9: queries 0..4, query 3 skipped -> 4 scored
        CHECK(small.too_small);
        CHECK(small.too_small_reason == "fewer than 20 scored queries (4)");
        CHECK_FALSE(small.estimate.has_interval());
        CHECK_FALSE(small.versus_rest);
        CHECK(small.rows == 30);
        const auto in = rows_where(d, 9, true);
        CHECK(small.estimate.value ==
              doctest::Approx(heldout::evaluate_queries(m, in.query, in.relevance, in.score).mean).epsilon(1e-14));
        CHECK(small.estimate.method_label.find("1 query with no relevant item skipped") != std::string::npos);
        // a slice of one scored query: undefined (no interval over one query)
        std::vector<int> market = d.market;
        for (std::size_t i = 0; i < market.size(); ++i)
            if (d.query[i] == 3 || d.query[i] == 4)
                market[i] = 50;
        const auto u = estimate_slices(all, d.query, market);
        CHECK(u.back().slice == 50);
        CHECK_FALSE(u.back().undefined.empty());
        CHECK(u.back().too_small);
        CHECK_FALSE(u.back().worst);
    }
    TEST_CASE("Bonferroni: each slice at 1 - (1 - level)/k") {
        const auto d = make(13);
        const heldout::measure::average_precision_at m{.k = 5};
        const auto all = heldout::evaluate_queries(m, d.query, d.relevance, d.score);
        const auto r = estimate_slices(all, d.query, d.market, {.simultaneous = true});
        const auto in = rows_where(d, 1, true);
        const auto e =
            heldout::estimate_queries(heldout::evaluate_queries(m, in.query, in.relevance, in.score), 1 - 0.05 / 4);
        CHECK(r[1].estimate.level == doctest::Approx(1 - 0.05 / 4));
        CHECK(*r[1].estimate.upper == doctest::Approx(*e.upper).epsilon(1e-13));
        // the bootstrap over queries: z from the two bootstrap standard errors
        const auto b = estimate_slices(all, d.query, d.market, {.method = heldout::ci::bootstrap_percentile(400, 3)});
        REQUIRE(b[0].versus_rest);
        CHECK_FALSE(b[0].versus_rest->df);
        CHECK(b[0].estimate.method == heldout::ci::method_id::bootstrap_percentile);
    }
    TEST_CASE("bad input") {
        const auto d = make(14);
        const heldout::measure::ndcg m{.k = 5};
        const auto all = heldout::evaluate_queries(m, d.query, d.relevance, d.score);
        std::vector<int> split_query = d.market;
        split_query[7] = 77; // row 7 is query 1's second row
        CHECK_THROWS_WITH_AS(estimate_slices(all, d.query, split_query),
                             "heldout::estimate_slices: argument 'slice_of_row': query 1 has slice 9 at row 6 and "
                             "slice 77 here: every row of a query must be in one slice at index 7",
                             heldout::input_error);
        const std::vector<int> short_ids(10, 0);
        CHECK_THROWS_AS(estimate_slices(all, d.query, short_ids), heldout::input_error);
        std::vector<int> other = d.query;
        for (auto& q : other)
            q += 1000;
        CHECK_THROWS_WITH_AS(estimate_slices(all, other, d.market),
                             "heldout::estimate_slices: argument 'query': query 0 of the result does not appear: give "
                             "the query ids the result was evaluated on",
                             heldout::input_error);
        CHECK_THROWS_AS(estimate_slices(all, d.query, d.market, {.level = 0}), heldout::input_error);
    }
}
