// Tests for heldout/query/compare_queries.hpp: mean difference, paired t, and the paired
// randomization (sign-flip) test against full enumeration of the sign vectors.
#include <heldout/query.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <random>
#include <sstream>
#include <string>
#include <vector>

using heldout::compare_queries;
using heldout::query_result;

namespace {

query_result result_of(const std::vector<double>& values, const std::string& measure = "NDCG@10") {
    query_result r;
    r.measure = measure;
    for (std::size_t i = 0; i < values.size(); ++i)
        r.per_query.push_back({static_cast<std::int64_t>(100 + i), values[i], 1.0});
    double s = 0;
    for (const double v : values)
        s += v;
    r.mean = s / static_cast<double>(values.size());
    return r;
}

/// p by plain enumeration of every sign vector as a bit mask (no Gray code, no shortcut).
double enumerated_p(const std::vector<double>& d) {
    const std::size_t q = d.size();
    double total = 0, scale = 0;
    for (const double x : d) {
        total += x;
        scale += std::abs(x);
    }
    const double bar = std::abs(total) - 1e-10 * scale;
    std::uint64_t hits = 0;
    for (std::uint64_t mask = 0; mask < (std::uint64_t{1} << q); ++mask) {
        double s = 0;
        for (std::size_t i = 0; i < q; ++i)
            s += (mask >> i & 1u) ? -d[i] : d[i];
        hits += std::abs(s) >= bar ? 1u : 0u;
    }
    return static_cast<double>(hits) / static_cast<double>(std::uint64_t{1} << q);
}

} // namespace

TEST_SUITE("query/compare_queries") {
    TEST_CASE("worked example: d = [1, 2, 3]") {
        // Sums of the 8 sign vectors: ±1 ±2 ±3 = 6, 4, 2, 0, 0, -2, -4, -6: |.| >= 6 twice, p = 2/8 = 0.25.
        // Mean 2, sd 1, se 1/sqrt 3, t = 2 sqrt 3, df 2; two-sided p of the t: 0.07417990022744853
        // (scipy.stats.t.sf(2*sqrt(3), 2) * 2, run live when this test was written).
        const auto a = result_of({1.5, 2.5, 3.5}), b = result_of({0.5, 0.5, 0.5});
        const auto c = compare_queries(a, b, {});
        CHECK(c.difference == doctest::Approx(2.0).epsilon(1e-15));
        CHECK(*c.se == doctest::Approx(1 / std::sqrt(3.0)).epsilon(1e-15));
        CHECK(c.statistic == doctest::Approx(2 * std::sqrt(3.0)).epsilon(1e-14));
        CHECK(*c.df == 2.0);
        CHECK(c.p_value == 0.25);
        CHECK(c.method == heldout::paired::method_id::randomization);
        CHECK(c.observations == 3);
        const auto t = compare_queries(a, b, {.method = heldout::paired::query_t});
        CHECK(t.p_value == doctest::Approx(0.07417990022744853).epsilon(1e-9));
        CHECK(t.method_label == "paired t over queries");
        std::ostringstream os;
        os << c;
        CHECK(os.str().rfind("NDCG@10 (0 queries with no relevant item skipped) A - B = 2 [", 0) == 0);
    }

    TEST_CASE("exact p equals the plain enumeration of all 2^Q sign vectors (Q = 1..16, random d)") {
        std::mt19937 g(3);
        std::normal_distribution<double> z(0.2, 1.0);
        for (std::size_t q = 1; q <= 16; ++q) {
            std::vector<double> d(q);
            for (auto& x : d)
                x = std::round(z(g) * 4) / 4; // quarter steps: ties among |sums| on the bar
            const auto r = heldout::sign_flip_test(d);
            CHECK(r.exact);
            CHECK(r.vectors == (std::size_t{1} << q));
            CHECK(r.p_value == enumerated_p(d));
        }
    }

    TEST_CASE("Monte Carlo p (Q = 22 > 20) agrees with the full enumeration within 4.5 binomial sd") {
        std::mt19937 g(17);
        std::normal_distribution<double> z(0.25, 1.0);
        std::vector<double> d(22);
        for (auto& x : d)
            x = z(g);
        const double exact = enumerated_p(d);
        CHECK(heldout::sign_flip_test(d, 22).p_value == exact); // exact enumeration allowed up to 26
        for (const std::uint64_t seed : {1u, 2u}) {
            const auto mc = heldout::sign_flip_test(d, 20, 20000, seed);
            CHECK(!mc.exact);
            const double sd = std::sqrt(exact * (1 - exact) / 20000.0);
            CHECK(std::abs(mc.p_value - exact) <= 4.5 * sd + 1.0 / 20000);
            CHECK(mc.p_value > 0); // (1 + hits)/(1 + B) is never 0
        }
        CHECK_THROWS_AS(heldout::sign_flip_test(d, 20, 9999, 0), heldout::input_error);
        CHECK_THROWS_AS(heldout::sign_flip_test(d, 27), heldout::input_error);
    }

    TEST_CASE("the query sets must match: a missing query is named") {
        const auto a = result_of({0.5, 0.6, 0.7});
        auto b = result_of({0.4, 0.6, 0.7});
        b.per_query.pop_back();
        b.skipped.push_back(102);
        CHECK_THROWS_WITH_AS(compare_queries(a, b, {}),
                             "heldout::compare_queries: argument 'b': query 102 of A is missing from B (skipped "
                             "there: no relevant item): the query sets differ",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(compare_queries(b, a, {}),
                             "heldout::compare_queries: argument 'a': query 102 of B is missing from A (skipped "
                             "there: no relevant item): the query sets differ",
                             heldout::input_error);
        CHECK_THROWS_AS(compare_queries(a, result_of({0.5, 0.6, 0.7}, "NDCG@5"), {}), heldout::input_error);
        auto dup = result_of({0.5, 0.6, 0.7});
        dup.per_query[2].query = 100;
        CHECK_THROWS_AS(compare_queries(dup, a, {}), heldout::input_error);
        auto heavy = result_of({0.4, 0.6, 0.7});
        heavy.per_query[0].weight = 2;
        CHECK_THROWS_AS(compare_queries(a, heavy, {}), heldout::input_error);
        CHECK_THROWS_AS(compare_queries(a, a, {.method = heldout::paired::corrected_t}), heldout::input_error);
    }

    TEST_CASE("identical rankers: difference 0, p = 1; a constant difference: se 0, infinite t") {
        const auto a = result_of({0.5, 0.6, 0.7});
        const auto same = compare_queries(a, a, {});
        CHECK(same.difference == 0.0);
        CHECK(same.p_value == 1.0);
        CHECK(same.statistic == 0.0);
        const auto shifted = compare_queries(result_of({1.5, 2.5, 3.5}), result_of({0.5, 1.5, 2.5}),
                                             {.method = heldout::paired::query_t});
        CHECK(std::isinf(shifted.statistic));
        CHECK(shifted.p_value == 0.0);
    }

    TEST_CASE("end to end: two rankers from evaluate_queries, more than 20 queries -> Monte Carlo, seeded") {
        std::mt19937 g(23);
        std::vector<int> q, rel;
        std::vector<double> sa, sb;
        for (int i = 0; i < 40; ++i)
            for (int j = 0; j < 15; ++j) {
                const int r = std::uniform_int_distribution<int>(0, 2)(g);
                q.push_back(i);
                rel.push_back(r);
                sa.push_back(r + std::normal_distribution<double>(0, 1.0)(g));
                sb.push_back(r + std::normal_distribution<double>(0, 3.0)(g));
            }
        const auto a = heldout::evaluate_queries(heldout::measure::ndcg{.k = 5}, q, rel, sa);
        const auto b = heldout::evaluate_queries(heldout::measure::ndcg{.k = 5}, q, rel, sb);
        const auto c1 = compare_queries(a, b, {.seed = 4});
        const auto c2 = compare_queries(a, b, {.seed = 4});
        CHECK(c1.p_value == c2.p_value);
        CHECK(c1.difference == doctest::Approx(a.mean - b.mean).epsilon(1e-14));
        CHECK(c1.difference > 0);
        CHECK(c1.p_value < 0.01);
        CHECK(c1.notes.size() >= 2);
    }
}
