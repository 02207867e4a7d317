// Every weighted measure in include/heldout/measure/ must not depend on the scale of the
// weights: value(c w) = value(w) for every c > 0 whose products c w_i are normal doubles.
// The weights mean relative importance (integer weights = replicated rows), so scaling them all
// by one c changes nothing mathematically; a result that moves (or a NaN, 0, 1 or exception)
// comes from products of weight sums overflowing or underflowing.
//
// Tolerances (our own analysis, no outside reference): c = 2^k is exact in binary floating
// point, so each c w_i is exact and the value must be bit-identical. Any other c rounds each
// c w_i once (relative 2^-53); the measures are sums, ratios and products of a few weight sums,
// so the value moves by a few units of 1e-16 times its conditioning: 1e-13 relative
// (1e-15 absolute for values near 0).
#include <heldout/loss/hinge.hpp>
#include <heldout/loss/huber.hpp>
#include <heldout/loss/logistic.hpp>
#include <heldout/loss/pinball.hpp>
#include <heldout/loss/poisson.hpp>
#include <heldout/measure.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <exception>
#include <random>
#include <span>
#include <string>
#include <vector>

namespace {

namespace hm = heldout::measure;

// The scale factors: 1e-300 .. 1e300 (the products stay normal: the weights lie in
// [0.25, 4], and 0), a factor that is no power of ten or two (3e250), and exact powers of two.
const std::vector<double> decimal_scales{1e-300, 1e-200, 1e-155, 1e-100, 1e-10, 1,     1e10,
                                         1e100,  1e155,  1e200,  1e300,  3e250, 7e-250};
const std::vector<double> binary_scales{0x1p-1000, 0x1p-520, 0x1p-300, 0x1p300, 0x1p520, 0x1p1000};

struct data {
    std::vector<int> y01, yk, l01, lk;             // binary / 3-class truth and predicted labels
    std::vector<double> score, prob, yr, fr, ypos; // scores (ties), P(y = 1), real truth and prediction, counts
    std::vector<double> rows;                      // 3-class probability rows, row-major
    std::vector<double> w;                         // weights in [0.25, 4], two of them 0
};

const data& sample() {
    static const data d = [] {
        data r;
        std::mt19937_64 g(20240611);
        std::uniform_real_distribution<double> u(0, 1);
        const std::size_t n = 61;
        for (std::size_t i = 0; i < n; ++i) {
            const int y = u(g) < 0.45 ? 1 : 0;
            r.y01.push_back(y);
            r.score.push_back(std::round((u(g) + 0.4 * y) * 20) / 20); // ties
            const double p = std::min(0.98, std::max(0.02, 0.3 * u(g) + 0.5 * y + 0.1));
            r.prob.push_back(p);
            r.l01.push_back(u(g) < 0.3 ? 1 - y : y);
            const int k = static_cast<int>(u(g) * 3);
            r.yk.push_back(k);
            r.lk.push_back(u(g) < 0.4 ? static_cast<int>(u(g) * 3) : k);
            double a = u(g) + (k == 0 ? 1 : 0), b = u(g) + (k == 1 ? 1 : 0), c = u(g) + (k == 2 ? 1 : 0);
            const double s = a + b + c;
            r.rows.insert(r.rows.end(), {a / s, b / s, c / s});
            r.yr.push_back(5 + 3 * u(g));
            r.fr.push_back(r.yr.back() + (u(g) - 0.5) * 2);
            r.ypos.push_back(std::floor(4 * u(g)));
            r.w.push_back(0.25 + 3.75 * u(g));
        }
        r.w[3] = 0;
        r.w[40] = 0;
        return r;
    }();
    return d;
}

std::vector<double> scaled(const std::vector<double>& w, double c) {
    std::vector<double> o(w.size());
    for (std::size_t i = 0; i < w.size(); ++i)
        o[i] = c * w[i];
    return o;
}

bool near(double a, double b) { return heldout_test::close(a, b, 1e-13, 1e-15); }

// value(c w) against value(w) for one measure, through evaluate() and through two unequal
// batches merged (the accumulators' own route); f(weights) and g(weights) give the two.
template <class Whole, class Merged>
void check_scales(const std::string& name, Whole whole, Merged merged) {
    const auto& w = sample().w;
    const double base = whole(w), base_merged = merged(w);
    CAPTURE(name);
    REQUIRE(std::isfinite(base));
    REQUIRE(std::isfinite(base_merged));
    for (double c : decimal_scales) {
        CAPTURE(c);
        const auto wc = scaled(w, c);
        std::string err;
        double a = NAN, b = NAN;
        try {
            a = whole(wc);
            b = merged(wc);
        } catch (const std::exception& e) {
            err = e.what();
        }
        CHECK(err == "");
        CHECK(near(a, base));
        CHECK(near(b, base_merged));
    }
    for (double c : binary_scales) {
        CAPTURE(c);
        const auto wc = scaled(w, c);
        std::string err;
        double a = NAN, b = NAN;
        try {
            a = whole(wc);
            b = merged(wc);
        } catch (const std::exception& e) {
            err = e.what();
        }
        CHECK(err == "");
        CHECK(a == base);
        CHECK(b == base_merged);
    }
}

// The rows split 0..h-1 and h..n-1 (unequal sizes).
constexpr std::size_t split_at = 23;

template <class T>
std::span<const T> head(const std::vector<T>& v, std::size_t per_row = 1) {
    return std::span<const T>(v).first(split_at * per_row);
}
template <class T>
std::span<const T> tail(const std::vector<T>& v, std::size_t per_row = 1) {
    return std::span<const T>(v).subspan(split_at * per_row);
}

// A measure on (truth, prediction) vectors, one prediction per row.
template <class M, class T, class P>
void check_measure(const M& m, const std::vector<T>& y, const std::vector<P>& f) {
    check_scales(
        m.name(), [&](const std::vector<double>& w) { return heldout::evaluate(m, y, f, w); },
        [&](const std::vector<double>& w) {
            auto a = m.accumulator(), b = m.accumulator();
            a.add(head(y), head(f), head(w));
            b.add(tail(y), tail(f), tail(w));
            a.merge(b);
            return a.value();
        });
}

// A measure on class-probability rows (k = 3).
template <class M>
void check_rows_measure(const M& m) {
    const auto& d = sample();
    check_scales(
        m.name(), [&](const std::vector<double>& w) { return heldout::evaluate(m, d.yk, heldout::rows(d.rows, 3), w); },
        [&](const std::vector<double>& w) {
            auto a = m.accumulator(), b = m.accumulator();
            a.add(head(d.yk), heldout::rows(head(d.rows, 3), 3), head(w));
            b.add(tail(d.yk), heldout::rows(tail(d.rows, 3), 3), tail(w));
            a.merge(b);
            return a.value();
        });
}

} // namespace

TEST_SUITE("measure/weight_scale") {
    TEST_CASE("ranking measures: AUC, AP, AUPRC, partial AUC, binned AUC") {
        const auto& d = sample();
        check_measure(hm::auc{}, d.y01, d.score);
        check_measure(hm::average_precision{}, d.y01, d.score);
        check_measure(hm::auprc{}, d.y01, d.score);
        check_measure(hm::auprc{hm::pr_start::first_precision}, d.y01, d.score);
        check_measure(hm::partial_auc{.fpr_low = 0, .fpr_high = 0.3}, d.y01, d.score);
        check_measure(hm::partial_auc{.fpr_low = 0.1, .fpr_high = 0.6, .standardized = true}, d.y01, d.score);
        check_measure(hm::binned_auc{.bins = 16, .low = 0, .high = 1}, d.y01, d.prob);
        check_measure(hm::binned_auc{.bins = 7, .low = 0, .high = 1.4}, d.y01, d.score);
    }
    TEST_CASE("ranked_sample's weighted AUC") {
        const auto& d = sample();
        const heldout::ranked_sample r(d.y01, d.score);
        check_scales(
            "ranked_sample", [&](const std::vector<double>& w) { return r.auc(w); },
            [&](const std::vector<double>& w) { return r.auc(w); });
    }
    TEST_CASE("curves: every ROC and precision-recall point") {
        const auto& d = sample();
        const auto roc = heldout::roc_points(d.y01, d.score, d.w);
        const auto pr = heldout::pr_points(d.y01, d.score, d.w);
        for (std::size_t i = 0; i < roc.size(); ++i)
            check_scales(
                "roc point " + std::to_string(i),
                [&](const std::vector<double>& w) {
                    return heldout::roc_points(d.y01, d.score, w).at(i).false_positive_rate;
                },
                [&](const std::vector<double>& w) {
                    return heldout::roc_points(d.y01, d.score, w).at(i).true_positive_rate;
                });
        for (std::size_t i = 0; i < pr.size(); ++i)
            check_scales(
                "pr point " + std::to_string(i),
                [&](const std::vector<double>& w) { return heldout::pr_points(d.y01, d.score, w).at(i).precision; },
                [&](const std::vector<double>& w) { return heldout::pr_points(d.y01, d.score, w).at(i).recall; });
    }
    TEST_CASE("multiclass AUC: Hand & Till M and prevalence-weighted one-vs-rest") {
        check_rows_measure(hm::multiclass_auc{});
        check_rows_measure(hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted});
    }
    TEST_CASE("probability measures: Brier score, log loss, calibration errors") {
        const auto& d = sample();
        check_measure(hm::brier_score{}, d.y01, d.prob);
        check_measure(hm::cross_entropy{}, d.y01, d.prob);
        for (auto rule : {hm::bin_rule::equal_width, hm::bin_rule::equal_count})
            for (auto variant : {hm::calibration_variant::positive_class, hm::calibration_variant::top_label})
                for (auto stat : {hm::calibration_statistic::expected, hm::calibration_statistic::maximum})
                    check_measure(
                        hm::calibration_error{.bins = 5, .binning = rule, .variant = variant, .statistic = stat}, d.y01,
                        d.prob);
        check_rows_measure(hm::multiclass_brier_score{});
        check_rows_measure(hm::multiclass_cross_entropy{});
        for (auto rule : {hm::bin_rule::equal_width, hm::bin_rule::equal_count})
            check_rows_measure(hm::multiclass_calibration_error{.bins = 4, .binning = rule});
    }
    TEST_CASE("pointwise means and regression measures") {
        const auto& d = sample();
        check_measure(hm::mse{}, d.yr, d.fr);
        check_measure(hm::mae{}, d.yr, d.fr);
        check_measure(hm::rmse{}, d.yr, d.fr);
        check_measure(hm::mean_loss<heldout::loss::huber>{{0.5}}, d.yr, d.fr);
        check_measure(hm::mean_loss<heldout::loss::pinball>{{0.9}}, d.yr, d.fr);
        check_measure(hm::mean_loss<heldout::loss::poisson>{}, d.ypos, d.score);
        check_measure(hm::mean_loss<heldout::loss::hinge>{}, d.y01, d.score);
        check_measure(hm::mean_loss<heldout::loss::logistic>{}, d.y01, d.score);
        check_measure(hm::r_squared{}, d.yr, d.fr);
        check_measure(hm::median_absolute_error{}, d.yr, d.fr);
        check_measure(hm::max_absolute_error{}, d.yr, d.fr);
    }
    TEST_CASE("pointwise means: losses far from 1 with weights far from 1") {
        // Squared errors near 1e-16 with weights near 1e-300 made products of 1e-316, subnormal
        // (digits lost without a word); errors near 1e5 with weights near 1e300 overflowed the
        // products (an overflow error although the mean, ~1e10, is a plain double).
        const auto& d = sample();
        std::vector<double> tiny_f(d.yr.size()), big_f(d.yr.size());
        for (std::size_t i = 0; i < d.yr.size(); ++i) {
            tiny_f[i] = d.yr[i] + 1e-8 * (d.fr[i] - d.yr[i]);
            big_f[i] = d.yr[i] + 1e5 * (d.fr[i] - d.yr[i]);
        }
        for (const auto* f : {&tiny_f, &big_f}) {
            check_measure(hm::mse{}, d.yr, *f);
            check_measure(hm::mae{}, d.yr, *f);
            check_measure(hm::rmse{}, d.yr, *f);
            check_measure(hm::mean_loss<heldout::loss::pinball>{{0.9}}, d.yr, *f);
            // add_one, weight by weight, and a merge of accumulators kept in different units
            check_scales(
                "MSE by add_one",
                [&](const std::vector<double>& w) { return heldout::evaluate(hm::mse{}, d.yr, *f, w); },
                [&](const std::vector<double>& w) {
                    auto a = hm::mse{}.accumulator(), b = a;
                    for (std::size_t i = 0; i < w.size(); ++i)
                        (i % 3 ? a : b).add_one(d.yr[i], (*f)[i], i % 2 ? w[i] : w[i] * 0x1p-400);
                    a.merge(b);
                    auto whole = hm::mse{}.accumulator();
                    for (std::size_t i = 0; i < w.size(); ++i)
                        whole.add_one(d.yr[i], (*f)[i], i % 2 ? w[i] : w[i] * 0x1p-400);
                    CHECK(near(a.value(), whole.value()));
                    return whole.value();
                });
        }
    }
    TEST_CASE("label measures, binary") {
        const auto& d = sample();
        check_measure(hm::classification_error{}, d.y01, d.l01);
        check_measure(hm::accuracy{}, d.y01, d.l01);
        check_measure(hm::balanced_accuracy{}, d.y01, d.l01);
        check_measure(hm::mcc{}, d.y01, d.l01);
        check_measure(hm::cohen_kappa{}, d.y01, d.l01);
        check_measure(hm::precision{}, d.y01, d.l01);
        check_measure(hm::recall{}, d.y01, d.l01);
        check_measure(hm::specificity{}, d.y01, d.l01);
        check_measure(hm::f_beta{.beta = 2.0}, d.y01, d.l01);
        Eigen::MatrixXd costs(2, 2);
        costs << 0, 1, 5, 0;
        check_measure(hm::cost_weighted_error{costs}, d.y01, d.l01);
    }
    TEST_CASE("label measures, three classes") {
        const auto& d = sample();
        check_measure(hm::classification_error{}, d.yk, d.lk);
        check_measure(hm::balanced_accuracy{}, d.yk, d.lk);
        check_measure(hm::mcc{}, d.yk, d.lk);
        for (auto k : {hm::kappa_weighting::unweighted, hm::kappa_weighting::linear, hm::kappa_weighting::quadratic})
            check_measure(hm::cohen_kappa{k}, d.yk, d.lk);
        for (auto c : {hm::class_combination::one_vs_rest, hm::class_combination::mean, hm::class_combination::pooled,
                       hm::class_combination::prevalence_weighted}) {
            check_measure(hm::precision{.combination = c}, d.yk, d.lk);
            check_measure(hm::recall{.combination = c}, d.yk, d.lk);
            check_measure(hm::specificity{.combination = c}, d.yk, d.lk);
            check_measure(hm::f_beta{.beta = 0.5, .combination = c}, d.yk, d.lk);
        }
        Eigen::MatrixXd costs(3, 3);
        costs << 0, 1, 2, 1, 0, 1, 4, 2, 0;
        check_measure(hm::cost_weighted_error{costs}, d.yk, d.lk);
    }
    TEST_CASE("total weight beyond the double range: the right value, or an input_error naming the weights") {
        // Weights of 1e308 (valid doubles) whose sums exceed 1.8e308. Measures that keep
        // ratios of per-row sums rescale by a power of two and give the value of weights 1, 2,
        // ... (oracle: the same rows with the weights divided by 1e308 / 2^k, exact here); a
        // table whose total weight is no longer a double is refused, never a NaN.
        const auto& d = sample();
        std::vector<double> huge(d.w.size()), unit(d.w.size());
        for (std::size_t i = 0; i < d.w.size(); ++i) {
            unit[i] = std::ldexp(std::round(d.w[i] * 4), -2); // quarter steps: exact below
            huge[i] = std::ldexp(unit[i], 1020);              // up to 2^1024 - ...: sums overflow
        }
        const auto same = [&](auto m, const auto& y, const auto& f) {
            CAPTURE(m.name());
            CHECK(heldout::evaluate(m, y, f, huge) == heldout::evaluate(m, y, f, unit));
        };
        same(hm::auc{}, d.y01, d.score);
        same(hm::average_precision{}, d.y01, d.score);
        same(hm::partial_auc{.fpr_low = 0, .fpr_high = 0.3}, d.y01, d.score);
        same(hm::r_squared{}, d.yr, d.fr);
        CHECK(heldout::evaluate(hm::multiclass_auc{}, d.yk, heldout::rows(d.rows, 3), huge) ==
              heldout::evaluate(hm::multiclass_auc{}, d.yk, heldout::rows(d.rows, 3), unit));
        const auto roc = heldout::roc_points(d.y01, d.score, huge), roc1 = heldout::roc_points(d.y01, d.score, unit);
        REQUIRE(roc.size() == roc1.size());
        for (std::size_t i = 0; i < roc.size(); ++i) {
            CHECK(roc[i].true_positive_rate == roc1[i].true_positive_rate);
            CHECK(roc[i].false_positive_rate == roc1[i].false_positive_rate);
        }
        CHECK_THROWS_WITH_AS(heldout::evaluate(hm::mcc{}, d.y01, d.l01, huge),
                             "measure MCC: argument 'weights': the total weight overflows double (beyond 1.8e308): "
                             "scale the weights down",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::evaluate(hm::cohen_kappa{}, d.yk, d.lk, huge), heldout::input_error);
        CHECK_THROWS_AS(heldout::evaluate(hm::precision{}, d.y01, d.l01, huge), heldout::input_error);
    }
    TEST_CASE("the confusion table scales with the weights, cell by cell") {
        // It reports weights, not a ratio: table(c w) = c table(w), exactly for c = 2^k.
        const auto& d = sample();
        const Eigen::MatrixXd t = heldout::evaluate(hm::confusion_matrix{}, d.yk, d.lk, d.w);
        for (double c : binary_scales) {
            CAPTURE(c);
            const Eigen::MatrixXd tc = heldout::evaluate(hm::confusion_matrix{}, d.yk, d.lk, scaled(d.w, c));
            CHECK((tc == t * c));
        }
    }
}
