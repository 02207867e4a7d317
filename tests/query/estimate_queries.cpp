// Tests for heldout/query/estimate_queries.hpp: t and bootstrap intervals over queries.
#include <heldout/measure/mae.hpp>
#include <heldout/query.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <vector>

using heldout::estimate_queries;
using heldout::query_result;

namespace {
query_result result_with(const std::vector<double>& v, const std::vector<double>& w) {
    query_result r;
    r.measure = "AP";
    double num = 0, den = 0;
    for (std::size_t i = 0; i < v.size(); ++i) {
        r.per_query.push_back({static_cast<std::int64_t>(i), v[i], w[i]});
        num += w[i] * v[i];
        den += w[i];
    }
    r.mean = num / den;
    return r;
}
} // namespace

TEST_SUITE("query/estimate_queries") {
    TEST_CASE("t over queries equals heldout::t_interval on the per-query values (tested against R's qt)") {
        const std::vector<double> v{0.1, 0.9, 0.45, 0.7, 0.33, 1.0, 0.0}, w(7, 1.0);
        const auto e = estimate_queries(result_with(v, w), 0.9);
        const auto t = heldout::t_interval(v, 0.9);
        CHECK(e.value == doctest::Approx(t.mean).epsilon(1e-15));
        CHECK(*e.se == doctest::Approx(t.se).epsilon(1e-14));
        CHECK(*e.lower == doctest::Approx(t.lower).epsilon(1e-14));
        CHECK(*e.upper == doctest::Approx(t.upper).epsilon(1e-14));
        CHECK(e.method == heldout::ci::method_id::t);
        CHECK(e.observations == 7);
        CHECK(e.method_label == "Student t over queries; 0 queries with no relevant item skipped");
        // Equal weights other than 1 change nothing.
        const auto e3 = estimate_queries(result_with(v, std::vector<double>(7, 3.0)), 0.9);
        CHECK(*e3.se == doctest::Approx(t.se).epsilon(1e-14));
    }

    TEST_CASE("weighted: linearised se of the ratio mean, by hand") {
        // v = [1, 0, 0.5], w = [2, 1, 1]: m = 2.5/4 = 0.625; Σ w²(v-m)² = 4(0.375²) + 0.625² + 0.125² = 0.96875;
        // se = sqrt(3/2 * 0.96875) / 4.
        const auto e = estimate_queries(result_with({1, 0, 0.5}, {2, 1, 1}));
        CHECK(e.value == 0.625);
        CHECK(*e.se == doctest::Approx(std::sqrt(1.5 * 0.96875) / 4).epsilon(1e-15));
    }

    TEST_CASE("bootstrap over queries = the row bootstrap of the per-query values (same draws, estimate/bootstrap)") {
        const std::vector<double> v{0.1, 0.9, 0.45, 0.7, 0.33, 1.0, 0.0, 0.25, 0.5}, w(9, 1.0);
        const auto r = result_with(v, w);
        const auto e = estimate_queries(r, 0.95, heldout::ci::bootstrap_percentile(999, 5));
        // The per-query values as per-row losses of mean_loss with the "value itself" loss (MAE against 0).
        const std::vector<double> zero(v.size(), 0.0);
        const auto b = heldout::bootstrap_percentile(heldout::measure::mae{}, zero, v, {999, 5, 0.95});
        CHECK(*e.lower == doctest::Approx(b.lower).epsilon(1e-14));
        CHECK(*e.upper == doctest::Approx(b.upper).epsilon(1e-14));
        const auto bca = estimate_queries(r, 0.95, heldout::ci::bca(999, 5));
        const auto bb = heldout::bootstrap_bca(heldout::measure::mae{}, zero, v, {999, 5, 0.95});
        CHECK(*bca.lower == doctest::Approx(bb.lower).epsilon(1e-12));
        CHECK(*bca.upper == doctest::Approx(bb.upper).epsilon(1e-12));
    }

    TEST_CASE("refusals: one query, a method that does not apply, a bad level") {
        CHECK_THROWS_AS(estimate_queries(result_with({0.5}, {1})), heldout::undefined_error);
        const auto r = result_with({0.5, 0.2, 0.9}, {1, 1, 1});
        CHECK_THROWS_AS(estimate_queries(r, 0.95, heldout::ci::corrected_t), heldout::input_error);
        CHECK_THROWS_AS(estimate_queries(r, 1.5), heldout::input_error);
    }
}
