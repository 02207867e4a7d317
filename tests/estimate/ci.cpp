// Tests for heldout/estimate/ci.hpp: the named methods, their settings, and what
// ci::automatic resolves to for each kind of plan (through the aggregator).
#include <heldout/estimate/ci.hpp>

#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>

#include <doctest/doctest.h>

#include <numeric>
#include <string>
#include <vector>

namespace ci = heldout::ci;
using heldout::aggregator;
using heldout::split;

TEST_SUITE("estimate/ci") {
    TEST_CASE("named values, identifiers and labels") {
        static_assert(ci::t.id == ci::method_id::t);
        static_assert(ci::corrected_t.id == ci::method_id::corrected_t);
        static_assert(ci::bca(5000, 7).replicates == 5000);
        static_assert(ci::bca(5000, 7).seed == 7);
        static_assert(ci::bootstrap_percentile.replicates == 2000); // the default B
        static_assert(ci::bca(3000) == ci::method{ci::method_id::bca, 3000, 0});
        CHECK(ci::id_text(ci::wilson.id) == "wilson");
        CHECK(ci::id_text(ci::bootstrap_632_plus.id) == "bootstrap_632_plus");
        CHECK(ci::label(ci::clopper_pearson.id) == "Clopper-Pearson");
        CHECK(ci::label(ci::naive_t.id) == "naive t over splits (undercovers)");
        CHECK(ci::label(ci::corrected_t.id) == "corrected t (Nadeau-Bengio)");
        const ci::method all[] = {ci::automatic,     ci::t,
                                  ci::wilson,        ci::clopper_pearson,
                                  ci::agresti_coull, ci::bootstrap_percentile,
                                  ci::bca,           ci::delong,
                                  ci::corrected_t,   ci::naive_t,
                                  ci::bootstrap_632, ci::bootstrap_632_plus};
        for (std::size_t i = 0; i < std::size(all); ++i)
            for (std::size_t j = i + 1; j < std::size(all); ++j)
                CHECK(ci::id_text(all[i].id) != ci::id_text(all[j].id));
    }

    TEST_CASE("only the bootstrap methods take replicates and a seed") {
        CHECK_THROWS_WITH_AS((void)ci::t(100, 1),
                             "heldout::ci::method: argument 'replicates': only ci::bootstrap_percentile and ci::bca "
                             "take replicates and a seed",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS((void)ci::bca(1),
                             "heldout::ci::method: argument 'replicates': at least 2 bootstrap replicates are needed",
                             heldout::input_error);
    }

    TEST_CASE("ci::automatic picks the valid method for what was run") {
        std::vector<std::size_t> all(8);
        std::iota(all.begin(), all.end(), std::size_t{0});
        const std::vector<double> y{1, 2, 3, 4, 5, 6, 7, 8}, f{1.5, 2, 2.5, 4, 6, 6, 7.5, 8};
        const std::vector<int> yl{0, 1, 1, 0, 1, 0, 1, 0}, fl{0, 1, 0, 0, 1, 1, 1, 0};
        const std::vector<double> s{0.1, 0.9, 0.4, 0.3, 0.8, 0.6, 0.7, 0.2};
        // one test set
        aggregator reg(heldout::measure::mse{});
        reg.record(split{{}, all, 0, 0, 0, {}}, y, f);
        CHECK(reg.estimate(heldout::measure::mse{}).method == ci::method_id::t);
        aggregator cls(heldout::measure::classification_error{});
        cls.record(split{{}, all, 0, 0, 0, {}}, yl, fl);
        CHECK(cls.estimate(heldout::measure::classification_error{}).method == ci::method_id::wilson);
        aggregator rank(heldout::measure::auc{});
        rank.record(split{{}, all, 0, 0, 0, {}}, yl, s);
        CHECK(rank.estimate(heldout::measure::auc{}).method == ci::method_id::delong);
        // several splits without replacement
        const std::vector<std::size_t> a{0, 1, 2, 3}, b{4, 5, 6, 7};
        aggregator cv(heldout::measure::mse{});
        cv.record(split{b, a, 0, 0, 0, {}}, std::span(y).first(4), std::span(f).first(4));
        cv.record(split{a, b, 0, 1, 1, {}}, std::span(y).last(4), std::span(f).last(4));
        CHECK(cv.estimate(heldout::measure::mse{}).method == ci::method_id::corrected_t);
        // bootstrap splits (draw counts) with the apparent result
        std::vector<std::uint32_t> counts(8, 0);
        counts[4] = counts[5] = counts[6] = counts[7] = 2;
        const std::vector<std::size_t> drawn{4, 4, 5, 5, 6, 6, 7, 7};
        aggregator boot(heldout::measure::mse{});
        boot.record(split{drawn, a, 0, 0, 0, counts}, std::span(y).first(4), std::span(f).first(4));
        boot.record_apparent(y, f);
        const auto e = boot.estimate(heldout::measure::mse{});
        CHECK(e.method == ci::method_id::bootstrap_632_plus);
        CHECK(e.method_label == ".632+ bootstrap");
    }
}
