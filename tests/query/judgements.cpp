// Tests for heldout/query/judgements.hpp: by_query, and query measures tracked by the
// aggregator over splits grouped by query (kinds::graded_relevance recorded as its own column).
#include <heldout/compare/comparison.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/query.hpp>

#include <doctest/doctest.h>

#include <cstdint>
#include <random>
#include <span>
#include <sstream>
#include <string>
#include <vector>

namespace m = heldout::measure;

namespace {
struct ranked_data {
    std::vector<std::int64_t> q;
    std::vector<int> rel;
    std::vector<double> sa, sb;
};

ranked_data make(std::size_t queries) {
    std::mt19937 g(101);
    ranked_data d;
    for (std::size_t i = 0; i < queries; ++i)
        for (int j = 0; j < 12; ++j) {
            const int r = std::uniform_int_distribution<int>(0, 3)(g) / 2;
            d.q.push_back(static_cast<std::int64_t>(1000 + i));
            d.rel.push_back(r);
            d.sa.push_back(r + std::normal_distribution<double>(0, 0.8)(g));
            d.sb.push_back(r + std::normal_distribution<double>(0, 2.0)(g));
        }
    return d;
}

template <class T>
std::vector<T> gather(const std::vector<T>& v, std::span<const std::size_t> rows) {
    std::vector<T> out;
    for (const std::size_t r : rows)
        out.push_back(v[r]);
    return out;
}
} // namespace

TEST_SUITE("query/judgements") {
    TEST_CASE("by_query views both columns without a copy and checks their sizes") {
        const std::vector<int> q{1, 1, 2};
        const std::vector<float> rel{1.5f, 0, 2};
        const auto j = heldout::by_query(q, rel);
        CHECK(j.size() == 3);
        CHECK(j.query.data() == q.data());
        CHECK(j.relevance.data() == rel.data());
        const std::vector<float> short_rel{1, 0};
        CHECK_THROWS_AS(heldout::by_query(q, short_rel), heldout::input_error);
        static_assert(std::is_same_v<heldout::truth_kind_t<m::ndcg>, heldout::kinds::graded_relevance>);
        static_assert(std::is_same_v<heldout::prediction_kind_t<m::ndcg>, heldout::kinds::query_score>);
    }

    TEST_CASE("the aggregator tracks query measures over splits grouped by query") {
        const auto d = make(60);
        heldout::aggregator agg_a(m::ndcg{.k = 5}, m::reciprocal_rank{}), agg_b(m::ndcg{.k = 5});
        const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 4, .seed = 3};
        std::vector<double> direct;
        for (const heldout::split& s : plan.splits(heldout::groups(d.q))) {
            const auto q = gather(d.q, s.test);
            const auto rel = gather(d.rel, s.test);
            const auto sa = gather(d.sa, s.test), sb = gather(d.sb, s.test);
            agg_a.record(s, heldout::by_query(q, rel), sa);
            agg_b.record(s, heldout::by_query(q, rel), sb);
            direct.push_back(heldout::evaluate_queries(m::ndcg{.k = 5}, q, rel, sa).mean);
        }
        // Per split: the mean over the test queries, as evaluate_queries gives it.
        const auto per = agg_a.split_values(m::ndcg{.k = 5});
        REQUIRE(per.size() == direct.size());
        for (std::size_t i = 0; i < per.size(); ++i)
            CHECK(*per[i].value == direct[i]);
        // Several random splits: the corrected t, as for any measure.
        const auto e = agg_a.estimate(m::ndcg{.k = 5});
        CHECK(e.method == heldout::ci::method_id::corrected_t);
        CHECK(e.splits == 20);
        // Repeats score each query again: the pooled value is the mean over every (query, repeat).
        REQUIRE(e.pooled);
        double sum = 0;
        for (const double v : direct)
            sum += v;
        CHECK(*e.pooled == doctest::Approx(sum / 20).epsilon(0.05)); // folds differ in size: close, not equal
        const auto c = heldout::compare(agg_a, agg_b, m::ndcg{.k = 5});
        CHECK(c.method == heldout::paired::method_id::corrected_t);
        CHECK(c.difference > 0);
        // A measure added later is computed from the kept columns.
        agg_a.add_measure(m::precision_at{.k = 3});
        CHECK(agg_a.estimate(m::precision_at{.k = 3}).splits == 20);
        // The kept truth reads back as the recorded view.
        const auto j = agg_a.truth_view<heldout::recorded_judgements>(0);
        CHECK(j.size() == agg_a.splits()[0].test_size);
        std::ostringstream csv;
        agg_a.write_predictions_csv(csv);
        CHECK(csv.str().find("split,repeat,fold,row,truth") == 0);
    }

    TEST_CASE("a query measure refuses plain labels, naming what it needs") {
        heldout::aggregator agg(m::ndcg{});
        const std::vector<int> y{1, 0, 1};
        const std::vector<double> f{.3, .2, .1};
        auto splits = heldout::kfold{.folds = 3, .seed = 1}.splits(3);
        const heldout::split& s = *splits.begin();
        try {
            agg.record(s, gather(y, s.test), gather(f, s.test));
            FAIL("no error");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()).find("graded relevance within queries") != std::string::npos);
        }
    }
}
