// Tests of heldout/censored/*.hpp: hand-worked cases, bad input, merge = whole, and the live
// reference tests/reference/ref_censored.py (R survival's concordance and survfit, base-R IPCW
// AUC and Brier score).
#include <heldout/censored/auc_at.hpp>
#include <heldout/censored/brier.hpp>
#include <heldout/censored/censoring_estimate.hpp>
#include <heldout/censored/column.hpp>
#include <heldout/censored/concordance_estimate.hpp>
#include <heldout/censored/harrell_c.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/censored/uno_c.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <sstream>
#include <string>
#include <vector>

namespace m = heldout::measure;

namespace {
std::vector<std::uint8_t> as_events(const std::vector<double>& v) {
    std::vector<std::uint8_t> e;
    for (const double x : v)
        e.push_back(static_cast<std::uint8_t>(x));
    return e;
}
std::string message_of(auto&& f) {
    try {
        f();
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}
} // namespace

TEST_SUITE("censored/censored") {

    // Hand-worked: time {1, 2, 2, 3, 4}, event {1, 1, 0, 1, 0}, risk {0.0, -0.0, 0.5, 0.5, 0.1}.
    // Comparable pairs (earlier event, later row): (0,1) tied (0.0 vs -0.0), (0,2) (0,3) (0,4)
    // discordant; (1,2) discordant (the censoring at 2 counts as later), (1,3) (1,4) discordant;
    // (3,4) concordant. C = (1 + 1/2) / 8.
    TEST_CASE("Harrell's C, hand-worked with a -0.0/0.0 tie and an event and a censoring at one time") {
        const std::vector<double> time{1, 2, 2, 3, 4};
        const std::vector<int> event{1, 1, 0, 1, 0};
        const std::vector<double> risk{0.0, -0.0, 0.5, 0.5, 0.1};
        CHECK(heldout::evaluate(m::harrell_c{}, heldout::censored(time, event), risk) ==
              doctest::Approx(1.5 / 8).epsilon(1e-15));
        // two events at one time are not comparable: only (0,2) and (1,2), both concordant
        const std::vector<double> t2{1, 1, 2};
        const std::vector<int> e2{1, 1, 0};
        const std::vector<double> r2{2, 1, 0};
        CHECK(heldout::evaluate(m::harrell_c{}, heldout::censored(t2, e2), r2) == 1.0);
    }

    // G by hand on the same rows: at 2, n = 4, d = 1, c = 1 -> G = 1 - 1/(4 - 1) = 2/3 (the event
    // leaves first); at 4, n = 1, c = 1 -> G = 0.
    TEST_CASE("censoring estimate, hand-worked: events leave the risk set first") {
        const std::vector<double> time{1, 2, 2, 3, 4};
        const std::vector<int> event{1, 1, 0, 1, 0};
        heldout::censoring_estimate g(heldout::censored(time, event));
        CHECK(g.before(2) == 1.0);
        CHECK(g.at(2) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        CHECK(g.before(3) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        CHECK(g.at(4) == 0.0);
        // Uno's C: u = 1 / G(T-)^2 = 1, 1, 9/4 for the events at 1, 2, 3;
        // numerator 1/2 * 1 + 0 + 9/4 * 1, comparable weight 4 * 1 + 3 * 1 + 9/4: C = 2.75 / 9.25.
        const std::vector<double> risk{0.0, -0.0, 0.5, 0.5, 0.1};
        CHECK(heldout::evaluate(m::uno_c{}, heldout::censored(time, event), risk) ==
              doctest::Approx(2.75 / 9.25).epsilon(1e-15));
        // horizon 2.5 drops the event at 3: (0.5 + 0) / (4 + 3)
        CHECK(heldout::evaluate(m::uno_c{.horizon = 2.5}, heldout::censored(time, event), risk) ==
              doctest::Approx(0.5 / 7).epsilon(1e-15));
    }

    // auc_at t = 2.5 on the same rows: cases rows 0 (w 1/G(1-) = 1) and 1 (w 1/G(2-) = 1); controls
    // rows 3, 4 (T > 2.5); row 2 censored by t is neither. Row 0 (0.0) vs 0.5, 0.1: 0; row 1 (-0.0): 0.
    // risk2 = {0.2, 0.1, 0, 0.1, 0.3}: row 0 beats 0.1 (1), row 1 ties 0.1 (1/2) -> 1.5 / (2 * 2).
    TEST_CASE("time-dependent AUC and Brier score, hand-worked") {
        const std::vector<double> time{1, 2, 2, 3, 4};
        const std::vector<int> event{1, 1, 0, 1, 0};
        const auto y = heldout::censored(time, event);
        const std::vector<double> risk2{0.2, 0.1, 0, 0.1, 0.3};
        CHECK(heldout::evaluate(m::auc_at{.time = 2.5}, y, risk2) == doctest::Approx(1.5 / 4).epsilon(1e-15));
        // BS(2.5) with S = {0.1, 0.2, 0.3, 0.4, 0.5}: events by t: 0.1^2 / 1 + 0.2^2 / 1; at risk after t:
        // (0.6^2 + 0.5^2) / G(2.5) = (0.36 + 0.25) * 3/2; row 2 weighs 0 but counts: / 5.
        const std::vector<double> s{0.1, 0.2, 0.3, 0.4, 0.5};
        CHECK(heldout::evaluate(m::brier_at{.time = 2.5}, y, s) ==
              doctest::Approx((0.01 + 0.04 + 0.61 * 1.5) / 5).epsilon(1e-15));
        CHECK_THROWS_AS(heldout::evaluate(m::auc_at{.time = 0.5}, y, risk2), heldout::undefined_error);
        CHECK_THROWS_AS(heldout::evaluate(m::auc_at{.time = 4}, y, risk2), heldout::undefined_error);
    }

    TEST_CASE("bad input names the row") {
        const std::vector<double> time{1, 2, -1, 3};
        const std::vector<int> event{1, 0, 1, 1};
        const std::vector<double> risk{1, 2, 3, 4};
        CHECK(message_of([&] {
                  heldout::evaluate(m::harrell_c{}, heldout::censored(time, event), risk);
              }).find("index 2") != std::string::npos);
        const std::vector<double> t_ok{1, 2, 3, 4};
        const std::vector<int> e_bad{1, 0, 2, 1};
        const std::string msg =
            message_of([&] { heldout::evaluate(m::uno_c{}, heldout::censored(t_ok, e_bad), risk); });
        CHECK(msg.find("event") != std::string::npos);
        CHECK(msg.find("index 2") != std::string::npos);
        const std::vector<double> r_nan{1, std::numeric_limits<double>::quiet_NaN(), 3, 4};
        const std::vector<int> e_ok{1, 0, 1, 1};
        CHECK(message_of([&] {
                  heldout::evaluate(m::harrell_c{}, heldout::censored(t_ok, e_ok), r_nan);
              }).find("index 1") != std::string::npos);
        const std::vector<int> none{0, 0, 0, 0};
        CHECK(message_of([&] {
                  heldout::evaluate(m::harrell_c{}, heldout::censored(t_ok, none), risk);
              }).find("no event") != std::string::npos);
        const std::vector<double> s_bad{0.5, 1.5, 0.5, 0.5};
        CHECK(message_of([&] {
                  heldout::evaluate(m::brier_at{.time = 2}, heldout::censored(t_ok, e_ok), s_bad);
              }).find("index 1") != std::string::npos);
        const std::vector<double> t_nan{1, 2, 3, std::numeric_limits<double>::quiet_NaN()};
        CHECK(message_of([&] {
                  heldout::evaluate(m::harrell_c{}, heldout::censored(t_nan, e_ok), risk);
              }).find("index 3") != std::string::npos);
        const std::vector<double> short_risk{1, 2};
        CHECK_THROWS_AS(heldout::evaluate(m::harrell_c{}, heldout::censored(t_ok, e_ok), short_risk),
                        heldout::input_error);
        CHECK_THROWS_AS(m::brier_over{.times = {1.0}}.accumulator(), heldout::input_error);
        const m::brier_over backwards{.times = {2.0, 1.0}};
        CHECK_THROWS_AS(backwards.accumulator(), heldout::input_error);
        // a batch's error names the row in everything added so far
        auto acc = m::harrell_c{}.accumulator();
        acc.add(heldout::censored(t_ok, e_ok), risk);
        CHECK(message_of([&] { acc.add(heldout::censored(time, event), risk); }).find("index 6") != std::string::npos);
        // only tied event times: no comparable pair
        const std::vector<double> t_same{2, 2};
        const std::vector<int> e_same{1, 1};
        const std::vector<double> r_two{1, 2};
        CHECK_THROWS_AS(heldout::evaluate(m::harrell_c{}, heldout::censored(t_same, e_same), r_two),
                        heldout::undefined_error);
    }

    TEST_CASE("against R survival and base-R IPCW formulas (ref_censored.py, live Rscript)") {
        const heldout_test::reference_table t("ref_censored");
        const auto time = t.get("time");
        const auto event = as_events(t.get("event"));
        const auto a = t.get("a");
        const auto b = t.get("b");
        const auto y = heldout::censored(time, event);
        const double tau = t.scalar("tau");
        MESSAGE(
            (t.scalar("R.live") == 1.0 ? "R reference: live (Rscript)" : "R reference: stored values (no Rscript)"));

        // R survival concordance(timewt = "n", reverse = TRUE): coef and var
        const auto hv = t.get("R.harrell.value");
        const auto hvar = t.get("R.harrell.var");
        CHECK(heldout::evaluate(m::harrell_c{}, y, a) == doctest::Approx(hv[0]).epsilon(1e-10));
        CHECK(heldout::evaluate(m::harrell_c{}, y, b) == doctest::Approx(hv[1]).epsilon(1e-10));
        const auto ea = heldout::concordance_estimate(m::harrell_c{}, y, a, 0.95);
        CHECK(*ea.se * *ea.se == doctest::Approx(hvar[0]).epsilon(1e-8));
        const auto eb = heldout::concordance_estimate(m::harrell_c{}, y, b, 0.95);
        CHECK(*eb.se * *eb.se == doctest::Approx(hvar[1]).epsilon(1e-8));
        const auto dh = heldout::compare_concordance(m::harrell_c{}, y, a, b, 0.95);
        CHECK(dh.difference == doctest::Approx(hv[0] - hv[1]).epsilon(1e-10));
        CHECK(*dh.se * *dh.se == doctest::Approx(t.scalar("R.harrell.diff_var")).epsilon(1e-8));

        // R survival concordance(timewt = "n/G2", ymax = tau, reverse = TRUE)
        const auto uv = t.get("R.uno.value");
        const auto uvar = t.get("R.uno.var");
        CHECK(heldout::evaluate(m::uno_c{.horizon = tau}, y, a) == doctest::Approx(uv[0]).epsilon(1e-10));
        CHECK(heldout::evaluate(m::uno_c{.horizon = tau}, y, b) == doctest::Approx(uv[1]).epsilon(1e-10));
        const auto ua = heldout::concordance_estimate(m::uno_c{.horizon = tau}, y, a, 0.95);
        CHECK(*ua.se * *ua.se == doctest::Approx(uvar[0]).epsilon(1e-8));
        const auto ub = heldout::concordance_estimate(m::uno_c{.horizon = tau}, y, b, 0.95);
        CHECK(*ub.se * *ub.se == doctest::Approx(uvar[1]).epsilon(1e-8));
        const auto du = heldout::compare_concordance(m::uno_c{.horizon = tau}, y, a, b, 0.95);
        CHECK(*du.se * *du.se == doctest::Approx(t.scalar("R.uno.diff_var")).epsilon(1e-8));
        CHECK(heldout::evaluate(m::uno_c{}, y, a) == doctest::Approx(t.scalar("R.uno_all.value")).epsilon(1e-10));
        const auto uall = heldout::concordance_estimate(m::uno_c{}, y, a, 0.95);
        CHECK(*uall.se * *uall.se == doctest::Approx(t.scalar("R.uno_all.var")).epsilon(1e-8));

        // R survfit(Surv(time2, 1 - event2) ~ 1): Kaplan-Meier of the censoring times
        const auto time2 = t.get("time2");
        const auto event2 = as_events(t.get("event2"));
        heldout::censoring_estimate g2(heldout::censored(time2, event2));
        const auto km_t = t.get("R.km.time");
        const auto km_s = t.get("R.km.surv");
        for (std::size_t k = 0; k < km_t.size(); ++k)
            CHECK(g2.at(km_t[k]) == doctest::Approx(km_s[k]).epsilon(1e-10));

        // base R: G with events first at ties, IPCW AUC (Uno 2007) and Brier (Graf 1999)
        heldout::censoring_estimate g(y);
        const auto grid = t.get("grid");
        const auto g_at = t.get("R.G.at_grid");
        const auto g_before = t.get("R.G.before_grid");
        for (std::size_t k = 0; k < grid.size(); ++k) {
            CHECK(g.at(grid[k]) == doctest::Approx(g_at[k]).epsilon(1e-12));
            CHECK(g.before(grid[k]) == doctest::Approx(g_before[k]).epsilon(1e-12));
        }
        CHECK(heldout::evaluate(m::auc_at{.time = t.scalar("t0")}, y, a) ==
              doctest::Approx(t.scalar("R.auc_at.a")).epsilon(1e-10));
        const auto bs = t.get("R.brier.grid");
        std::vector<double> curves;
        for (std::size_t i = 0; i < a.size(); ++i)
            for (const double u : grid)
                curves.push_back(std::exp(-std::exp(a[i]) * u / 5));
        for (std::size_t k = 0; k < grid.size(); ++k) {
            std::vector<double> s;
            for (std::size_t i = 0; i < a.size(); ++i)
                s.push_back(curves[i * grid.size() + k]);
            CHECK(heldout::evaluate(m::brier_at{.time = grid[k]}, y, s) == doctest::Approx(bs[k]).epsilon(1e-10));
        }
        CHECK(heldout::evaluate(m::brier_over{.times = grid}, y, heldout::rows(curves, grid.size())) ==
              doctest::Approx(t.scalar("R.brier.integrated")).epsilon(1e-10));

        // merge = whole, and the O(n log n) count = the O(n^2) pair loop
        auto left = m::uno_c{.horizon = tau}.accumulator();
        auto right = m::uno_c{.horizon = tau}.accumulator();
        const std::size_t half = time.size() / 2;
        left.add(heldout::censored(std::span(time).first(half), std::span(event).first(half)),
                 std::span(a).first(half));
        right.add(heldout::censored(std::span(time).subspan(half), std::span(event).subspan(half)),
                  std::span(a).subspan(half));
        left.merge(right);
        CHECK(left.value() == heldout::evaluate(m::uno_c{.horizon = tau}, y, a));
        double conc = 0, comp = 0;
        for (std::size_t i = 0; i < time.size(); ++i)
            for (std::size_t j = 0; j < time.size(); ++j)
                if (event[i] && (time[j] > time[i] || (time[j] == time[i] && !event[j]))) {
                    comp += 1;
                    conc += a[i] > a[j] ? 1.0 : (a[i] == a[j] ? 0.5 : 0.0);
                }
        CHECK(heldout::evaluate(m::harrell_c{}, y, a) == doctest::Approx(conc / comp).epsilon(1e-14));
    }

    TEST_CASE("concordance_estimate and compare_concordance: printing, level, identical models") {
        const std::vector<double> time{1, 2, 3, 4, 5, 6, 2, 8};
        const std::vector<int> event{1, 1, 0, 1, 1, 0, 1, 1};
        const std::vector<double> a{4, 3, 2, 1, 0, 2, 5, 1};
        const auto y = heldout::censored(time, event);
        const auto e = heldout::concordance_estimate(m::harrell_c{}, y, a, 0.9);
        std::ostringstream os;
        os << e;
        CHECK(os.str().find("infinitesimal jackknife, n=8") != std::string::npos);
        CHECK(e.value == heldout::evaluate(m::harrell_c{}, y, a));
        CHECK(*e.lower < e.value);
        CHECK(*e.upper - e.value == doctest::Approx(e.value - *e.lower).epsilon(1e-15));
        CHECK_THROWS_AS(heldout::concordance_estimate(m::harrell_c{}, y, a, 1.0), heldout::input_error);
        const auto same = heldout::compare_concordance(m::harrell_c{}, y, a, a);
        CHECK(same.difference == 0.0);
        CHECK(same.p_value == 1.0);
        CHECK(*same.se == 0.0);
    }

    TEST_CASE("serialised state round-trips and merges; the aggregator records censored truths") {
        const heldout_test::reference_table t("ref_censored");
        const auto time = t.get("time");
        const auto event = as_events(t.get("event"));
        const auto a = t.get("a");
        const auto y = heldout::censored(time, event);
        const m::uno_c uno{.horizon = t.scalar("tau")};

        auto acc = uno.accumulator();
        acc.add(y, a);
        const auto bytes = heldout::serialize(acc);
        const auto back = heldout::deserialize<decltype(acc)>(bytes);
        CHECK(back.measure() == uno);
        CHECK(back.value() == acc.value());
        auto other = m::uno_c{.horizon = 1}.accumulator();
        CHECK_THROWS_AS(other.merge(back), heldout::state_error);

        // 5-fold CV stratified by the event indicator: per-split values equal evaluate on the
        // split's rows; the pooled value equals the measure over all rows (every row tested once)
        heldout::aggregator agg(m::harrell_c{}, uno);
        std::vector<double> split_values;
        for (const heldout::split& s : heldout::kfold{.folds = 5, .seed = 3}.splits(heldout::strata(event))) {
            std::vector<double> tt, rr;
            std::vector<std::uint8_t> ee;
            for (const auto i : s.test) {
                tt.push_back(time[i]);
                ee.push_back(event[i]);
                rr.push_back(a[i]);
            }
            agg.record(s, heldout::censored(tt, ee), rr);
            split_values.push_back(heldout::evaluate(m::harrell_c{}, heldout::censored(tt, ee), rr));
        }
        const heldout::estimate e = agg.estimate(m::harrell_c{});
        CHECK(e.splits == 5);
        double mean = 0;
        for (const double v : split_values)
            mean += v / 5;
        CHECK(e.value == doctest::Approx(mean).epsilon(1e-14));
        CHECK(e.has_interval());
        CHECK(agg.estimate(uno).splits == 5);
    }

} // TEST_SUITE
