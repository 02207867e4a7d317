// Tests for heldout/slices/estimate_slices.hpp: per-slice estimates, the too-small rule, slice
// versus rest with Holm adjustment, the worst-slice note, Bonferroni intervals, every family.
#include <heldout/calibration.hpp>
#include <heldout/censored.hpp>
#include <heldout/compare/holm.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure.hpp>
#include <heldout/plan.hpp>
#include <heldout/slices/estimate_slices.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <numeric>
#include <random>
#include <string>
#include <vector>

using heldout::estimate_slices;

namespace {
heldout::split one_test_set(std::vector<std::size_t>& rows, std::size_t n) {
    rows.resize(n);
    std::iota(rows.begin(), rows.end(), std::size_t{0});
    return heldout::split{{}, rows, 0, 0, 0, {}, heldout::split_design::random};
}
template <class T>
std::vector<T> pick(const std::vector<T>& v, std::span<const std::size_t> rows) {
    std::vector<T> out;
    for (const auto r : rows)
        out.push_back(v[r]);
    return out;
}
struct binary_data {
    std::vector<int> y;
    std::vector<double> p;
    std::vector<int> region;
};
// 600 rows, 3 regions of 200; the model is worse in region 2 (noisier scores).
binary_data make_binary(std::uint64_t seed) {
    std::mt19937_64 g(seed);
    std::uniform_real_distribution<double> u;
    std::normal_distribution<double> z;
    binary_data d;
    for (int i = 0; i < 600; ++i) {
        const int region = i % 3;
        const int y = u(g) < 0.4 ? 1 : 0;
        const double s = (y ? 1.0 : -1.0) * (region == 2 ? 0.3 : 1.2) + z(g);
        d.y.push_back(y);
        d.p.push_back(1 / (1 + std::exp(-s)));
        d.region.push_back(region * 10 - 5); // ids -5, 5, 15: any integers
    }
    return d;
}
} // namespace

TEST_SUITE("slices/estimate_slices") {
    TEST_CASE("one test set: each slice is the measure on its rows, with the one-test-set interval") {
        const auto d = make_binary(1);
        std::vector<std::size_t> rows;
        heldout::aggregator agg(heldout::measure::brier_score{});
        agg.record(one_test_set(rows, d.y.size()), d.y, d.p);
        const auto r = estimate_slices(agg, heldout::measure::brier_score{}, d.region);
        REQUIRE(r.size() == 3);
        CHECK(r[0].slice == -5);
        CHECK(r[2].slice == 15);
        for (std::size_t k = 0; k < 3; ++k) {
            std::vector<std::size_t> mine;
            for (std::size_t i = 0; i < d.y.size(); ++i)
                if (d.region[i] == r[k].slice)
                    mine.push_back(i);
            const auto ys = pick(d.y, mine);
            const auto ps = pick(d.p, mine);
            // the same as an aggregator recorded with the slice's rows alone
            std::vector<std::size_t> rr;
            heldout::aggregator by_hand(heldout::measure::brier_score{});
            by_hand.record(one_test_set(rr, ys.size()), ys, ps);
            const auto e = by_hand.estimate(heldout::measure::brier_score{});
            CHECK(r[k].estimate.value == doctest::Approx(e.value).epsilon(1e-15));
            CHECK(*r[k].estimate.lower == doctest::Approx(*e.lower).epsilon(1e-15));
            CHECK(r[k].estimate.method == heldout::ci::method_id::t);
            CHECK(r[k].rows == 200);
            CHECK(r[k].class_rows.size() == 2);
            CHECK(r[k].class_rows[0] + r[k].class_rows[1] == 200);
            CHECK(r[k].class_rows[1] == static_cast<std::size_t>(std::count(ys.begin(), ys.end(), 1)));
            CHECK_FALSE(r[k].too_small);
            REQUIRE(r[k].versus_rest);
        }
        // slice vs rest: z from the two independent standard errors (written out here)
        std::vector<std::size_t> rest_rows;
        for (std::size_t i = 0; i < d.y.size(); ++i)
            if (d.region[i] != 15)
                rest_rows.push_back(i);
        std::vector<std::size_t> rr;
        heldout::aggregator rest(heldout::measure::brier_score{});
        const auto yr = pick(d.y, rest_rows);
        rest.record(one_test_set(rr, yr.size()), yr, pick(d.p, rest_rows));
        const auto er = rest.estimate(heldout::measure::brier_score{});
        const auto& c = *r[2].versus_rest;
        const double se = std::sqrt(*r[2].estimate.se * *r[2].estimate.se + *er.se * *er.se);
        CHECK(c.rest_value == doctest::Approx(er.value).epsilon(1e-15));
        CHECK(c.difference == doctest::Approx(r[2].estimate.value - er.value).epsilon(1e-14));
        CHECK(c.statistic == doctest::Approx(c.difference / se).epsilon(1e-13));
        CHECK(c.p_value == doctest::Approx(std::erfc(std::abs(c.statistic) / std::sqrt(2.0))).epsilon(1e-12));
        CHECK(c.p_value < 0.01); // region 15 is the noisy one
        // Holm (1979) across the three slices
        const auto adj =
            heldout::holm_adjust(std::vector<double>{r[0].versus_rest->p_value, r[1].versus_rest->p_value, c.p_value});
        for (std::size_t k = 0; k < 3; ++k)
            CHECK(r[k].versus_rest->adjusted_p_value == adj[k]);
        // the worst slice is the noisy region, with its note
        CHECK(r[2].worst);
        CHECK_FALSE(r[0].worst);
        CHECK(r[2].estimate.notes.back().find("the worst of 3 slices") != std::string::npos);
    }
    TEST_CASE("repeated k-fold: mean of per-split slice values, corrected t; slice vs rest on per-split differences") {
        std::mt19937_64 g(7);
        std::normal_distribution<double> z;
        const std::size_t n = 300;
        std::vector<double> y(n), f(n);
        std::vector<long> band(n);
        for (std::size_t i = 0; i < n; ++i) {
            band[i] = static_cast<long>(i % 4);
            y[i] = z(g);
            f[i] = y[i] + (band[i] == 3 ? 1.5 : 0.5) * z(g);
        }
        const heldout::repeated_kfold plan{.folds = 5, .repeats = 4, .seed = 11};
        heldout::aggregator agg(heldout::measure::mse{});
        for (const heldout::split& s : plan.splits(n))
            agg.record(s, pick(y, s.test), pick(f, s.test));
        const auto r = estimate_slices(agg, heldout::measure::mse{}, band);
        REQUIRE(r.size() == 4);
        // by hand: per split, the MSE of the slice's test rows and of the rest
        for (std::size_t k = 0; k < 4; ++k) {
            std::vector<double> vs, d;
            double slice_test = 0;
            for (const heldout::split& s : plan.splits(n)) {
                double a = 0, b = 0;
                std::size_t na = 0, nb = 0;
                for (const auto row : s.test) {
                    const double e = (y[row] - f[row]) * (y[row] - f[row]);
                    if (static_cast<std::size_t>(band[row]) == k) {
                        a += e;
                        ++na;
                    } else {
                        b += e;
                        ++nb;
                    }
                }
                vs.push_back(a / static_cast<double>(na));
                d.push_back(a / static_cast<double>(na) - b / static_cast<double>(nb));
                slice_test += static_cast<double>(na);
            }
            slice_test /= 20.0;
            const auto t = heldout::corrected_resampled_t(vs, 240.0, slice_test, 0.95);
            CHECK(r[k].estimate.value == doctest::Approx(t.mean).epsilon(1e-13));
            CHECK(*r[k].estimate.lower == doctest::Approx(t.lower).epsilon(1e-12));
            CHECK(r[k].estimate.method == heldout::ci::method_id::corrected_t);
            CHECK(r[k].estimate.splits == 20);
            CHECK(r[k].rows == 75);
            CHECK(r[k].class_rows.empty());
            CHECK_FALSE(r[k].too_small);
            const auto c = heldout::corrected_resampled_t(d, 240.0, 60.0, 0.95);
            REQUIRE(r[k].versus_rest);
            CHECK(r[k].versus_rest->difference == doctest::Approx(c.mean).epsilon(1e-12));
            CHECK(r[k].versus_rest->p_value == doctest::Approx(c.p_value).epsilon(1e-10));
            CHECK(*r[k].versus_rest->df == 19);
        }
        CHECK(r[3].worst);
        CHECK(r[3].versus_rest->difference > 0);
        CHECK(r[3].versus_rest->adjusted_p_value < 0.05);

        // Bonferroni: each interval at 1 - 0.05 / 4, wider than the separate ones
        const auto b = estimate_slices(agg, heldout::measure::mse{}, band, {.simultaneous = true});
        CHECK(b[0].estimate.level == doctest::Approx(1 - 0.05 / 4).epsilon(1e-15));
        CHECK(*b[0].estimate.lower < *r[0].estimate.lower);
        CHECK(*b[0].estimate.upper > *r[0].estimate.upper);
    }
    TEST_CASE("too small: the rule, no confident interval, no comparison") {
        const auto d = make_binary(2);
        std::vector<int> slice(d.y.size(), 0);
        // slice 1: 30 rows, of which only 4 of class 1
        int ones = 0, zeros = 0;
        for (std::size_t i = 0; i < d.y.size(); ++i) {
            if (d.y[i] == 1 && ones < 4) {
                slice[i] = 1;
                ++ones;
            } else if (d.y[i] == 0 && zeros < 26) {
                slice[i] = 1;
                ++zeros;
            }
        }
        std::vector<std::size_t> rows;
        heldout::aggregator agg(heldout::measure::auc{});
        agg.add_measure(heldout::at_threshold(heldout::measure::classification_error{}, 0.5));
        agg.record(one_test_set(rows, d.y.size()), d.y, d.p);
        const auto r = estimate_slices(agg, heldout::measure::auc{}, slice);
        REQUIRE(r.size() == 2);
        CHECK_FALSE(r[0].too_small);
        CHECK(r[1].too_small);
        CHECK(r[1].too_small_reason == "fewer than 10 rows of class 1 (4)");
        CHECK_FALSE(r[1].estimate.has_interval()); // DeLong dropped: never a confident-looking interval
        CHECK(r[1].estimate.method_label.find("no interval: slice too small") != std::string::npos);
        CHECK_FALSE(r[1].versus_rest);
        CHECK(r[0].versus_rest); // the other slice is still compared (Holm over one test: p unchanged)
        CHECK(r[0].versus_rest->adjusted_p_value == r[0].versus_rest->p_value);
        CHECK(r[0].worst); // the worst among the slices not too small (here the only one)
        CHECK_FALSE(r[1].worst);
        const auto e =
            estimate_slices(agg, heldout::at_threshold(heldout::measure::classification_error{}, 0.5), slice);
        CHECK(e[1].too_small);
        CHECK(e[1].estimate.method == heldout::ci::method_id::wilson);
        CHECK(e[1].estimate.has_interval()); // Wilson is a small-sample interval: kept
        // real truth: fewer than 20 rows
        std::vector<double> yv(d.p.size());
        for (std::size_t i = 0; i < yv.size(); ++i)
            yv[i] = d.p[i] * 3;
        std::vector<int> few(d.p.size(), 0);
        for (std::size_t i = 0; i < 19; ++i)
            few[i] = 1;
        heldout::aggregator reg(heldout::measure::mae{});
        reg.record(one_test_set(rows, yv.size()), yv, d.p);
        const auto q = estimate_slices(reg, heldout::measure::mae{}, few);
        CHECK(q[1].too_small);
        CHECK(q[1].too_small_reason == "fewer than 20 rows (19)");
        // a split without the slice's rows
        const heldout::kfold plan{.folds = 5, .seed = 3};
        heldout::aggregator cv(heldout::measure::mae{});
        for (const heldout::split& s : plan.splits(yv.size()))
            cv.record(s, pick(yv, s.test), pick(d.p, s.test));
        std::vector<int> one_fold(yv.size(), 0);
        for (const auto row : cv.test_rows(0))
            one_fold[row] = 1;
        const auto w = estimate_slices(cv, heldout::measure::mae{}, one_fold);
        CHECK(w[1].too_small);
        CHECK(w[1].too_small_reason == "no test row in 4 of 5 splits");
        CHECK(w[1].splits_with_rows == 1);
    }
    TEST_CASE("undefined on a slice: AUC on a slice with one class") {
        const auto d = make_binary(3);
        std::vector<int> slice(d.y.size(), 0);
        std::size_t taken = 0;
        for (std::size_t i = 0; i < d.y.size() && taken < 40; ++i)
            if (d.y[i] == 0) {
                slice[i] = 7;
                ++taken;
            }
        std::vector<std::size_t> rows;
        heldout::aggregator agg(heldout::measure::auc{});
        agg.record(one_test_set(rows, d.y.size()), d.y, d.p);
        const auto r = estimate_slices(agg, heldout::measure::auc{}, slice);
        REQUIRE(r.size() == 2);
        CHECK_FALSE(r[1].undefined.empty());
        CHECK(std::isnan(r[1].estimate.value));
        CHECK(r[1].too_small);
        CHECK_FALSE(r[1].worst);
        CHECK(r[0].estimate.method == heldout::ci::method_id::delong);
    }
    TEST_CASE("every family: class-probability rows, censored times, calibration slope") {
        std::mt19937_64 g(5);
        std::uniform_real_distribution<double> u;
        const std::size_t n = 200;
        std::vector<int> lab(n), grp(n);
        std::vector<double> probs;
        std::vector<double> time(n);
        std::vector<int> event(n);
        std::vector<double> risk(n);
        for (std::size_t i = 0; i < n; ++i) {
            grp[i] = static_cast<int>(i % 2);
            lab[i] = static_cast<int>(i % 3);
            double a = u(g), b = u(g), c = u(g);
            a += lab[i] == 0 ? 1 : 0;
            b += lab[i] == 1 ? 1 : 0;
            c += lab[i] == 2 ? 1 : 0;
            probs.insert(probs.end(), {a / (a + b + c), b / (a + b + c), c / (a + b + c)});
            risk[i] = u(g);
            time[i] = 1 + std::floor(10 * u(g) * (1.5 - risk[i]));
            event[i] = u(g) < 0.7 ? 1 : 0;
        }
        std::vector<std::size_t> rows;
        const auto s = one_test_set(rows, n);
        heldout::aggregator agg(heldout::measure::multiclass_brier_score{});
        agg.record(s, lab, heldout::rows(probs, 3));
        const auto r = estimate_slices(agg, heldout::measure::multiclass_brier_score{}, grp);
        REQUIRE(r.size() == 2);
        CHECK(r[0].class_rows.size() == 3);
        std::vector<int> l0;
        std::vector<double> p0;
        for (std::size_t i = 0; i < n; i += 2) {
            l0.push_back(lab[i]);
            p0.insert(p0.end(), probs.begin() + static_cast<std::ptrdiff_t>(3 * i),
                      probs.begin() + static_cast<std::ptrdiff_t>(3 * i + 3));
        }
        CHECK(r[0].estimate.value ==
              doctest::Approx(heldout::evaluate(heldout::measure::multiclass_brier_score{}, l0, heldout::rows(p0, 3)))
                  .epsilon(1e-14));

        // Harrell's C has no one-test-set interval in the aggregator: two random halves
        const heldout::kfold halves{.folds = 2, .seed = 9};
        heldout::aggregator surv(heldout::measure::harrell_c{});
        for (const heldout::split& sp : halves.splits(n))
            surv.record(sp, heldout::censored(pick(time, sp.test), pick(event, sp.test)), pick(risk, sp.test));
        const auto c = estimate_slices(surv, heldout::measure::harrell_c{}, grp);
        REQUIRE(c.size() == 2);
        double mean = 0;
        for (const heldout::split& sp : halves.splits(n)) {
            std::vector<double> t1, r1;
            std::vector<int> e1;
            for (const auto row : sp.test)
                if (grp[row] == 1) {
                    t1.push_back(time[row]);
                    e1.push_back(event[row]);
                    r1.push_back(risk[row]);
                }
            mean += heldout::evaluate(heldout::measure::harrell_c{}, heldout::censored(t1, e1), r1) / 2;
        }
        CHECK(c[1].estimate.value == doctest::Approx(mean).epsilon(1e-14));
        CHECK(c[1].estimate.method == heldout::ci::method_id::corrected_t);
        CHECK(c[1].class_rows.empty());

        // a measure with an ideal value: the worst slice is the farthest from it
        std::vector<double> p(n);
        std::vector<int> y(n);
        for (std::size_t i = 0; i < n; ++i) {
            const double x = 4 * (u(g) - 0.5);
            const double truth_p = 1 / (1 + std::exp(-(grp[i] ? 0.3 * x : x)));
            y[i] = u(g) < truth_p ? 1 : 0;
            p[i] = 1 / (1 + std::exp(-x));
        }
        heldout::aggregator cal(heldout::measure::calibration_slope{});
        cal.record(s, y, p);
        const auto k = estimate_slices(cal, heldout::measure::calibration_slope{}, grp);
        CHECK(k[0].estimate.method == heldout::ci::method_id::wald);
        CHECK(k[1].worst == (std::abs(k[1].estimate.value - 1) > std::abs(k[0].estimate.value - 1)));
    }
    TEST_CASE("bad input") {
        const auto d = make_binary(4);
        std::vector<std::size_t> rows;
        heldout::aggregator agg(heldout::measure::brier_score{});
        agg.record(one_test_set(rows, d.y.size()), d.y, d.p);
        const std::vector<int> short_ids(10, 0);
        CHECK_THROWS_WITH_AS(estimate_slices(agg, heldout::measure::brier_score{}, short_ids),
                             "heldout::estimate_slices: argument 'slice_of_row': size 10 does not reach test row 10 of "
                             "split 0: give one slice id per data row",
                             heldout::input_error);
        heldout::aggregator none(heldout::measure::brier_score{});
        CHECK_THROWS_AS(estimate_slices(none, heldout::measure::brier_score{}, d.region), heldout::input_error);
        heldout::aggregator unkept(heldout::measure::brier_score{});
        unkept.keep_predictions(false);
        unkept.record(one_test_set(rows, d.y.size()), d.y, d.p);
        CHECK_THROWS_AS(estimate_slices(unkept, heldout::measure::brier_score{}, d.region), heldout::input_error);
        CHECK_THROWS_AS(estimate_slices(agg, heldout::measure::brier_score{}, d.region, {.level = 1.5}),
                        heldout::input_error);
    }
}
