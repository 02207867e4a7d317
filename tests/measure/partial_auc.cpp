// Tests for heldout/measure/partial_auc.hpp: area under the ROC curve over an FPR range,
// with the McClish (1989) standardisation.
#include <heldout/measure/partial_auc.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <span>
#include <string_view>
#include <vector>

using heldout::evaluate;
using heldout::measure::partial_auc;

using heldout_test::check_fresh_merges;

TEST_SUITE("measure/partial_auc") {
    TEST_CASE("worked example on Davis & Goadrich 2006, worked by hand Check B data, areas by hand") {
        // ROC vertices (FPR, TPR): (0,0) (0,.2) (.2,.4) (.6,.6) (.6,.8) (1,.8) (1,1).
        const std::vector<int> y{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<double> s{0.9, 0.8, 0.8, 0.7, 0.7, 0.7, 0.5, 0.4, 0.4, 0.2};
        // [0, 0.2]: trapezoid (0,.2)-(.2,.4) = 0.2 * 0.3 = 0.06
        CHECK(evaluate(partial_auc{.fpr_low = 0, .fpr_high = 0.2}, y, s) == doctest::Approx(0.06).epsilon(1e-14));
        // [0.1, 0.4]: TPR(.1) = .3, TPR(.4) = .5: 0.1*(.3+.4)/2 + 0.2*(.4+.5)/2 = 0.035 + 0.09 = 0.125
        CHECK(evaluate(partial_auc{.fpr_low = 0.1, .fpr_high = 0.4}, y, s) == doctest::Approx(0.125).epsilon(1e-14));
        // full range = AUC 0.58 (Davis & Goadrich 2006, worked by hand)
        CHECK(evaluate(partial_auc{}, y, s) == doctest::Approx(0.58).epsilon(1e-14));
        // McClish on [0, 0.2]: min = 0.02, max = 0.2: (1 + (0.06 - 0.02)/0.18)/2 = 0.61111...
        CHECK(evaluate(partial_auc{.fpr_low = 0, .fpr_high = 0.2, .standardized = true}, y, s) ==
              doctest::Approx((1 + 0.04 / 0.18) / 2).epsilon(1e-14));
        // standardised over [0, 1] is the AUC itself: (1 + (A - 1/2)/(1/2))/2 = A
        CHECK(evaluate(partial_auc{.standardized = true}, y, s) == doctest::Approx(0.58).epsilon(1e-14));
        // additivity over adjacent ranges
        CHECK(evaluate(partial_auc{.fpr_low = 0, .fpr_high = 0.37}, y, s) +
                  evaluate(partial_auc{.fpr_low = 0.37, .fpr_high = 1}, y, s) ==
              doctest::Approx(0.58).epsilon(1e-14));
    }
    TEST_CASE("numpy reference (ref_partial_auc.py): numpy.interp + numpy.trapz; McClish 1989 formula; weights") {
        heldout_test::reference_table ref("ref_partial_auc");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            CAPTURE(c);
            const auto y = ref.get_as<int>(k + "truth");
            const auto s = ref.get(k + "scores");
            const auto w = ref.get(k + "weights");
            const auto r = ref.get(k + "range");
            const partial_auc m{.fpr_low = r[0], .fpr_high = r[1]};
            const partial_auc ms{.fpr_low = r[0], .fpr_high = r[1], .standardized = true};
            CHECK(heldout_test::close(evaluate(m, y, s), ref.scalar(k + "pauc"), 1e-12));
            CHECK(heldout_test::close(evaluate(ms, y, s), ref.scalar(k + "mcclish"), 1e-12));
            CHECK(heldout_test::close(evaluate(m, y, s, w), ref.scalar(k + "wpauc"), 1e-12));
            CHECK(heldout_test::close(evaluate(partial_auc{}, y, s), ref.scalar(k + "full"))); // scipy mannwhitneyu
        }
    }
    TEST_CASE("merge into a fresh accumulator, add_one with a first weight not 1, self-merge: no row lost") {
        // Positives 0.9 (weight 3) and 0.3; negatives 0.8 and 0.1. Weighted ROC vertices (FPR, TPR):
        // (0,0) (0,3/4) (1/2,3/4) (1/2,1) (1,1): area over [0, 1/2] = 3/8; unweighted
        // (0,0) (0,1/2) (1/2,1/2) (1/2,1) (1,1): 1/4 [SELF, by hand].
        const std::vector<int> y{1, 0, 1, 0};
        const std::vector<double> sd{0.9, 0.8, 0.3, 0.1}; // not floats: kept as doubles
        const std::vector<float> sf{0.9f, 0.8f, 0.3f, 0.1f};
        const std::vector<double> w{3, 1, 1, 1};
        const partial_auc half{.fpr_low = 0, .fpr_high = 0.5};
        CHECK(evaluate(half, y, sd) == doctest::Approx(0.25).epsilon(1e-15));
        CHECK(evaluate(half, y, sd, w) == doctest::Approx(0.375).epsilon(1e-15));
        for (const auto& m :
             {half, partial_auc{.fpr_low = 0.1, .fpr_high = 0.7, .standardized = true}, partial_auc{}}) {
            check_fresh_merges(m, y, sd, w);
            check_fresh_merges(m, y, sf, w);
        }
        constexpr std::string_view who = heldout::measure::detail_pauc::eval::who(); // no string per add()
        CHECK(who == "measure partial AUC");
    }
    TEST_CASE("bad ranges, names, undefined") {
        const std::vector<int> y{1, 0};
        const std::vector<double> s{0.6, 0.4};
        CHECK_THROWS_WITH_AS(evaluate(partial_auc{.fpr_low = 0.5, .fpr_high = 0.5}, y, s),
                             "measure partial AUC: argument 'fpr_high': must exceed fpr_low (0.5), got 0.5",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(evaluate(partial_auc{.fpr_low = -0.1, .fpr_high = 0.5}, y, s),
                             "measure partial AUC: argument 'fpr_low': must lie in [0, 1], got -0.1",
                             heldout::input_error);
        CHECK(partial_auc{.fpr_low = 0, .fpr_high = 0.1}.name() == "partial AUC [0, 0.1]");
        const std::vector<int> one{1, 1};
        CHECK_THROWS_AS(evaluate(partial_auc{}, one, s), heldout::undefined_error);
        auto a = partial_auc{.fpr_low = 0, .fpr_high = 0.5}.accumulator();
        auto b = partial_auc{.fpr_low = 0, .fpr_high = 0.4}.accumulator();
        CHECK_THROWS_AS(a.merge(b), heldout::input_error);
    }
}
