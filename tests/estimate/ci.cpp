// Tests for heldout/estimate/ci.hpp: the named methods, their settings, and what
// ci::automatic resolves to for each kind of plan (through the aggregator).
#include <heldout/estimate/ci.hpp>

#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/estimate/methods.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/plan/leave_one_out.hpp>
#include <heldout/plan/purged_kfold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/walk_forward.hpp>

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
                                  ci::bootstrap_632, ci::bootstrap_632_plus,
                                  ci::newcombe};
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
        // 4 positives and 4 negatives: Newcombe's interval (delong_small_class, measured in the coverage study)
        CHECK(rank.estimate(heldout::measure::auc{}).method == ci::method_id::newcombe);
        CHECK(rank.estimate(heldout::measure::auc{}, ci::delong).method == ci::method_id::delong);
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

    TEST_CASE("ci::automatic per plan kind: corrected t only on random splits; the rule table refuses the rest") {
        // 24 rows, y = i, a model that predicts the training mean (so every split has real errors).
        const std::size_t n = 24;
        std::vector<double> y(n);
        std::iota(y.begin(), y.end(), 0.0);
        auto fit_predict = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            double m = 0;
            for (auto r : train)
                m += y[r];
            m /= static_cast<double>(train.size());
            return std::vector<double>(test.size(), m);
        };
        const heldout::measure::mse mse;
        // random: repeated k-fold -> corrected t (design_rules row 'random')
        auto cv = heldout::evaluate_splits(heldout::repeated_kfold{.folds = 4, .repeats = 2, .seed = 3}.splits(n), y,
                                           fit_predict, mse);
        CHECK(cv.estimate(mse).method == ci::method_id::corrected_t);
        CHECK(heldout::rule_for(heldout::split_design::random).interval_default == "corrected_t");
        // The three designs without a valid default: the refusal gives the design's reason
        // from design_rules and lists what applies (here only the naive t, with its caution).
        auto refuses = [&](const aggregator& agg, heldout::split_design d, std::string_view design_words) {
            CAPTURE(design_words);
            CHECK(heldout::rule_for(d).interval_default.empty());
            CHECK(agg.method_shape().design == d);
            try {
                (void)agg.estimate(mse);
                FAIL("ci::automatic did not refuse");
            } catch (const heldout::input_error& e) {
                const std::string what = e.what();
                CHECK(what.find("no interval method has a valid default for " + std::string(design_words)) !=
                      std::string::npos);
                CHECK(what.find(std::string(heldout::rule_for(d).why)) != std::string::npos);
                CHECK(what.find("ci::naive_t") != std::string::npos);
                CHECK(what.find("ci::corrected_t") == std::string::npos); // not even as an option
            }
            // asking for the corrected t by name is refused too
            CHECK_THROWS_AS((void)agg.estimate(mse, ci::corrected_t), heldout::input_error);
            // the naive t is never a default, but can be asked for by name (labelled as undercovering)
            CHECK(agg.estimate(mse, ci::naive_t).method == ci::method_id::naive_t);
        };
        refuses(heldout::evaluate_splits(heldout::leave_one_out{}.splits(n), y, fit_predict, mse),
                heldout::split_design::leave_one_out, "leave-one-out");
        refuses(heldout::evaluate_splits(heldout::walk_forward{.initial = 8, .horizon = 4, .step = 4}.splits(n), y,
                                         fit_predict, mse),
                heldout::split_design::time_ordered, "time-ordered splits");
        std::vector<int> t0(n), t1(n);
        for (std::size_t i = 0; i < n; ++i) {
            t0[i] = static_cast<int>(i);
            t1[i] = static_cast<int>(i) + 1;
        }
        refuses(heldout::evaluate_splits(heldout::purged_kfold{.folds = 4}.splits(heldout::intervals(t0, t1)), y,
                                         fit_predict, mse),
                heldout::split_design::purged, "purged k-fold");
        // leave-one-out made by hand (test sets of one row, design left 'random') is still leave-one-out
        aggregator hand(mse);
        std::vector<std::size_t> rows(n);
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        for (std::size_t i = 0; i < n; ++i) {
            std::vector<std::size_t> train;
            for (auto r : rows)
                if (r != i)
                    train.push_back(r);
            const std::vector<std::size_t> test{i};
            const auto p = fit_predict(train, test);
            hand.record(split{train, test, 0, i, i, {}}, std::span(y).subspan(i, 1), p);
        }
        refuses(hand, heldout::split_design::leave_one_out, "leave-one-out");
    }
    TEST_CASE("design_rules: one row per design, and the .632+ rule for bootstrap samples") {
        CHECK(heldout::design_rules.size() == 5);
        CHECK(heldout::rule_for(heldout::split_design::bootstrap).interval_default == "bootstrap_632_plus");
        CHECK(heldout::rule_for(heldout::split_design::random).paired_default == "corrected_t");
        for (const auto d : {heldout::split_design::leave_one_out, heldout::split_design::time_ordered,
                             heldout::split_design::purged, heldout::split_design::bootstrap})
            CHECK(heldout::rule_for(d).paired_default.empty());
        heldout::record_shape mixed;
        mixed.splits = 3;
        mixed.mixed_designs = true;
        heldout::measure_facts f;
        f.row_losses = true;
        CHECK(!ci::automatic_choice(mixed, f));
        CHECK(!heldout::paired::automatic_choice(mixed, f));
        CHECK(heldout::refusal_reason(mixed).find("mix several designs") != std::string_view::npos);
    }
}
