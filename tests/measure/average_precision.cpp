// Tests for heldout/measure/average_precision.hpp: step-wise average precision and the
// trapezoidal PR AUC, tied scores entered as one group.
#include <heldout/measure/average_precision.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cstdint>
#include <limits>
#include <span>
#include <string_view>
#include <vector>

using heldout::evaluate;
using heldout::measure::auprc;
using heldout::measure::average_precision;
using heldout::measure::pr_start;

using heldout_test::check_fresh_merges;

TEST_SUITE("measure/average_precision") {
    TEST_CASE("Davis & Goadrich 2006, worked by hand Check A (no ties): AP = 251/336, trapezoid = 475/672 from (0,1) "
              "and from (0,P_1)") {
        // Manning, Raghavan & Schütze 2008 ch. 8 (AP as mean precision at each positive) and the
        // trapezoid of Davis & Goadrich 2006's PR space; values worked by hand, exact fractions.
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0};
        const std::vector<double> s{0.9, 0.8, 0.7, 0.6, 0.55, 0.5, 0.4, 0.3};
        // Precision at the positives' ranks 1, 3, 4, 7: 1, 2/3, 3/4, 4/7; mean = 251/336.
        CHECK(evaluate(average_precision{}, y, s) == doctest::Approx(251.0 / 336).epsilon(1e-15));
        CHECK(evaluate(auprc{}, y, s) == doctest::Approx(475.0 / 672).epsilon(1e-15));
        CHECK(evaluate(auprc{pr_start::first_precision}, y, s) == doctest::Approx(475.0 / 672).epsilon(1e-15));
    }
    TEST_CASE(
        "Davis & Goadrich 2006, worked by hand Check B (ties grouped): AP = 68/105, trapezoid from (0,1) = 863/1260") {
        const std::vector<int> y{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<double> s{0.9, 0.8, 0.8, 0.7, 0.7, 0.7, 0.5, 0.4, 0.4, 0.2};
        CHECK(evaluate(average_precision{}, y, s) == doctest::Approx(68.0 / 105).epsilon(1e-15));
        CHECK(evaluate(auprc{}, y, s) == doctest::Approx(863.0 / 1260).epsilon(1e-15));
        // Ties do not depend on the order of rows: reversing the input changes nothing.
        const std::vector<int> yr(y.rbegin(), y.rend());
        const std::vector<double> sr(s.rbegin(), s.rend());
        CHECK(evaluate(average_precision{}, yr, sr) == evaluate(average_precision{}, y, s));
        // First point (1/5, 1): from (0, P_1 = 1) the trapezoid is the same here.
        CHECK(evaluate(auprc{pr_start::first_precision}, y, s) == doctest::Approx(863.0 / 1260).epsilon(1e-15));
    }
    TEST_CASE("the start convention matters when the first precision is below 1") {
        // Points: (1/2, 1/2) at 0.9 (one positive, one negative tied), then (1, 2/3) at 0.1.
        const std::vector<int> y{1, 0, 1};
        const std::vector<double> s{0.9, 0.9, 0.1};
        // from (0,1): 1/2 * (1 + 1/2)/2 + 1/2 * (1/2 + 2/3)/2 = 3/8 + 7/24 = 2/3
        CHECK(evaluate(auprc{}, y, s) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        // from (0, 1/2): 1/2 * 1/2 + 7/24 = 13/24
        CHECK(evaluate(auprc{pr_start::first_precision}, y, s) == doctest::Approx(13.0 / 24).epsilon(1e-15));
        // AP: 1/2 * 1/2 + 1/2 * 2/3 = 7/12
        CHECK(evaluate(average_precision{}, y, s) == doctest::Approx(7.0 / 12).epsilon(1e-15));
    }
    TEST_CASE("scripted numpy reference (ref_average_precision.py), heavy ties, integer weights = replicated rows") {
        heldout_test::reference_table ref("ref_average_precision");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            CAPTURE(c);
            const auto y = ref.get_as<int>(k + "truth");
            const auto s = ref.get(k + "scores");
            const auto w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(average_precision{}, y, s), ref.scalar(k + "ap")));
            CHECK(heldout_test::close(evaluate(auprc{}, y, s), ref.scalar(k + "trap")));
            CHECK(heldout_test::close(evaluate(auprc{pr_start::first_precision}, y, s), ref.scalar(k + "trap_first")));
            CHECK(heldout_test::close(evaluate(average_precision{}, y, s, w), ref.scalar(k + "wap")));
            CHECK(heldout_test::close(evaluate(auprc{}, y, s, w), ref.scalar(k + "wtrap")));
        }
    }
    TEST_CASE("measures, merge and state") {
        CHECK(heldout::outer_measure<average_precision>);
        CHECK(heldout::outer_measure<auprc>);
        CHECK(average_precision{}.name() == "average precision");
        CHECK(auprc::better == heldout::direction::higher_is_better);
        const std::vector<int> y{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<float> s{0.9f, 0.8f, 0.8f, 0.7f, 0.7f, 0.7f, 0.5f, 0.4f, 0.4f, 0.2f};
        auto a = average_precision{}.accumulator();
        auto b = average_precision{}.accumulator();
        a.add(std::span(y).first(4), std::span(s).first(4));
        b.add(std::span(y).subspan(4), std::span(s).subspan(4));
        a.merge(b);
        CHECK(a.value() == evaluate(average_precision{}, y, s));
        auto t1 = auprc{}.accumulator();
        auto t2 = auprc{pr_start::first_precision}.accumulator();
        CHECK_THROWS_WITH_AS(
            t1.merge(t2),
            "measure PR AUC (trapezoidal): argument 'other': cannot merge a state of PR AUC (trapezoidal, "
            "from the first precision) into one of PR AUC (trapezoidal): the parameters differ",
            heldout::input_error);
        std::vector<int> codes;
        t2.visit_state([&](const auto& m) {
            if constexpr (std::is_same_v<std::remove_cvref_t<decltype(m)>, std::uint8_t>)
                codes.push_back(m);
        });
        CHECK(codes == std::vector<int>{1}); // the start convention travels with the state
    }
    TEST_CASE("merge into a fresh accumulator, add_one with a first weight not 1, self-merge: no row lost") {
        // Scores descending 0.9 (1, weight 3), 0.8 (0), 0.3 (1), 0.1 (0). Weighted: after 0.9
        // P = 1, R = 3/4; after 0.3 P = 4/5, R = 1: AP = 3/4 + (1/4)(4/5) = 0.95; unweighted
        // AP = 1/2 + (1/2)(2/3) = 5/6 [SELF, by hand, Manning, Raghavan & Schütze 2008 ch. 8].
        const std::vector<int> y{1, 0, 1, 0};
        const std::vector<double> sd{0.9, 0.8, 0.3, 0.1}; // not floats: kept as doubles
        const std::vector<float> sf{0.9f, 0.8f, 0.3f, 0.1f};
        const std::vector<double> w{3, 1, 1, 1};
        CHECK(evaluate(average_precision{}, y, sd) == doctest::Approx(5.0 / 6).epsilon(1e-15));
        CHECK(evaluate(average_precision{}, y, sd, w) == doctest::Approx(0.95).epsilon(1e-15));
        check_fresh_merges(average_precision{}, y, sd, w);
        check_fresh_merges(average_precision{}, y, sf, w);
        for (const auto& m : {auprc{}, auprc{pr_start::first_precision}}) {
            check_fresh_merges(m, y, sd, w);
            check_fresh_merges(m, y, sf, w);
        }
        // the parameters travel through a merge into a fresh accumulator
        auto t2 = auprc{pr_start::first_precision}.accumulator();
        t2.add(y, sd, w);
        auto fresh = auprc{pr_start::first_precision}.accumulator();
        fresh.merge(t2);
        CHECK(fresh.value() == evaluate(auprc{pr_start::first_precision}, y, sd, w));
    }
    TEST_CASE("the measure names are compile-time views: no string is built per add() or value()") {
        constexpr std::string_view ap = heldout::measure::detail_pr::ap_eval::who();
        constexpr std::string_view tr = heldout::measure::detail_pr::auprc_eval::who();
        CHECK(ap == "measure average precision");
        CHECK(tr == "measure PR AUC (trapezoidal)");
    }
    TEST_CASE("undefined without positives; no negatives gives 1; bad input") {
        const std::vector<int> none{0, 0, 0};
        const std::vector<double> s{0.1, 0.2, 0.3};
        CHECK_THROWS_WITH_AS(evaluate(average_precision{}, none, s),
                             "measure average precision: undefined: class 1 (positives) is absent; recall needs "
                             "positives",
                             heldout::undefined_error);
        const std::vector<int> all{1, 1, 1};
        CHECK(evaluate(average_precision{}, all, s) == 1.0);
        CHECK(evaluate(auprc{}, all, s) == 1.0);
        std::vector<double> bad(s);
        bad[2] = std::numeric_limits<double>::quiet_NaN();
        CHECK_THROWS_WITH_AS(evaluate(auprc{}, all, bad),
                             "measure PR AUC (trapezoidal): argument 'scores': not finite (nan) at index 2",
                             heldout::input_error);
        auto acc = average_precision{}.accumulator();
        CHECK_THROWS_WITH_AS((void)acc.value(), "measure average precision: undefined: no observations",
                             heldout::undefined_error);
    }
}
