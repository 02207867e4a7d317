// Tests for heldout/stream/parallel.hpp: the thread count never changes the result, for
// every outer measure of every family; exact measures also equal evaluate().
#include "stream/cases.hpp"

#include <heldout/loss/hinge.hpp>
#include <heldout/loss/huber.hpp>
#include <heldout/loss/logistic.hpp>
#include <heldout/loss/pinball.hpp>
#include <heldout/loss/poisson.hpp>
#include <heldout/loss/zero_one.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/balanced_accuracy.hpp>
#include <heldout/measure/binned_auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/calibration_error.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/cohen_kappa.hpp>
#include <heldout/measure/cost_weighted_error.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/mae.hpp>
#include <heldout/measure/max_absolute_error.hpp>
#include <heldout/measure/mcc.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/measure/median_absolute_error.hpp>
#include <heldout/measure/multiclass_auc.hpp>
#include <heldout/measure/partial_auc.hpp>
#include <heldout/measure/precision_recall.hpp>
#include <heldout/measure/r_squared.hpp>
#include <heldout/measure/rmse.hpp>
#include <heldout/stream/parallel.hpp>

#include <doctest/doctest.h>

#include <random>
#include <string>
#include <vector>

namespace {
using namespace stream_cases;
namespace hm = heldout::measure;

/// 1..4 threads give the same bits (chunks of 1000 rows: 13 chunks of 12345 rows, the last
/// one short); the value matches evaluate() as `how` says. Unweighted and weighted.
template <input K, class M>
void check_parallel(const std::string& label, const M& m, const data& d, agree how) {
    const auto t = truth<K>(d);
    const auto p = prediction<K>(d);
    const std::span<const double> w(d.w);
    for (const bool weighted : {false, true}) {
        INFO("measure: " << label << std::string(weighted ? ", weighted" : ""));
        auto run = [&](std::size_t threads) {
            const heldout::parallel_options o{.threads = threads, .chunk = 1000};
            return weighted ? heldout::evaluate_parallel(m, t, p, w, o) : heldout::evaluate_parallel(m, t, p, o);
        };
        const double one = run(1);
        for (std::size_t threads = 2; threads <= 4; ++threads)
            CHECK(run(threads) == one);
        const double serial = weighted ? heldout::evaluate(m, t, p, w) : heldout::evaluate(m, t, p);
        if (how == agree::exact || (how == agree::exact_unweighted && !weighted))
            CHECK(one == serial);
        else
            CHECK(one == doctest::Approx(serial).epsilon(1e-12));
    }
}

} // namespace

TEST_SUITE("stream/parallel") {
    TEST_CASE("MSE on 1..4 threads is bit-identical and matches evaluate()") {
        std::mt19937_64 g(5);
        std::normal_distribution<double> d;
        std::vector<float> y(300001), f(300001);
        std::vector<double> w(y.size());
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<float>(d(g));
            f[i] = static_cast<float>(d(g));
            w[i] = (i % 3) * 0.5;
        }
        const double one = heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = 1, .chunk = 4096});
        for (std::size_t t = 2; t <= 4; ++t)
            CHECK(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = t, .chunk = 4096}) == one);
        CHECK(one == doctest::Approx(heldout::evaluate(heldout::measure::mse{}, y, f)).epsilon(1e-14));
        const double w1 = heldout::evaluate_parallel(heldout::measure::mse{}, y, f, w, {.threads = 1, .chunk = 4096});
        CHECK(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, w, {.threads = 3, .chunk = 4096}) == w1);
        CHECK(w1 == doctest::Approx(heldout::evaluate(heldout::measure::mse{}, y, f, w)).epsilon(1e-14));
    }
    TEST_CASE("every pointwise and probability measure: thread-count independent") {
        const data d(12345);
        check_parallel<input::real>("MSE", hm::mse{}, d, agree::close);
        check_parallel<input::real>("MAE", hm::mae{}, d, agree::close);
        check_parallel<input::real>("RMSE", hm::rmse{}, d, agree::close);
        check_parallel<input::real>("R-squared", hm::r_squared{}, d, agree::close);
        check_parallel<input::real>("max absolute error", hm::max_absolute_error{}, d, agree::exact);
        check_parallel<input::real>("median absolute error", hm::median_absolute_error{}, d, agree::exact);
        check_parallel<input::real>("mean Huber", hm::mean_loss<heldout::loss::huber>{{1.5}}, d, agree::close);
        check_parallel<input::real>("mean pinball", hm::mean_loss<heldout::loss::pinball>{{0.9}}, d, agree::close);
        check_parallel<input::counts>("mean Poisson", hm::mean_loss<heldout::loss::poisson>{}, d, agree::close);
        check_parallel<input::margin>("mean logistic", hm::mean_loss<heldout::loss::logistic>{}, d, agree::close);
        check_parallel<input::margin>("mean hinge", hm::mean_loss<heldout::loss::hinge>{}, d, agree::close);
        check_parallel<input::margin>("mean 0-1", hm::mean_loss<heldout::loss::zero_one>{{0.2}}, d,
                                      agree::exact_unweighted);
        check_parallel<input::probability>("Brier", hm::brier_score{}, d, agree::close);
        check_parallel<input::probability>("cross-entropy", hm::cross_entropy{1e-12}, d, agree::close);
        check_parallel<input::probability>("ECE equal width", hm::calibration_error{}, d, agree::close);
        check_parallel<input::probability>("ECE equal count",
                                           hm::calibration_error{.bins = 10, .binning = hm::bin_rule::equal_count}, d,
                                           agree::exact);
        check_parallel<input::rows3>("multiclass Brier", hm::multiclass_brier_score{}, d, agree::close);
        check_parallel<input::rows3>("multiclass cross-entropy", hm::multiclass_cross_entropy{1e-9}, d, agree::close);
        check_parallel<input::rows3>("multiclass ECE", hm::multiclass_calibration_error{}, d, agree::close);
    }
    TEST_CASE("every label measure: thread-count independent, counts exact") {
        // confusion_matrix is not an outer measure (its value is a table, it has no direction),
        // so evaluate_parallel does not take it; its accumulator merges are covered by
        // stream/serialize.
        const data d(12345);
        check_parallel<input::labels3>("classification error", hm::classification_error{}, d, agree::exact_unweighted);
        check_parallel<input::labels3>("accuracy", hm::accuracy{.classes = 3}, d, agree::exact_unweighted);
        check_parallel<input::labels3>("balanced accuracy", hm::balanced_accuracy{}, d, agree::exact_unweighted);
        check_parallel<input::labels3>("cost-weighted error", hm::cost_weighted_error{costs3()}, d,
                                       agree::exact_unweighted);
        check_parallel<input::labels3>("mean precision", hm::precision{.combination = hm::class_combination::mean}, d,
                                       agree::exact_unweighted);
        check_parallel<input::labels3>("pooled recall", hm::recall{.combination = hm::class_combination::pooled}, d,
                                       agree::exact_unweighted);
        check_parallel<input::labels3>(
            "specificity of class 2", hm::specificity{.combination = hm::class_combination::one_vs_rest, .positive = 2},
            d, agree::exact_unweighted);
        check_parallel<input::labels3>(
            "prevalence-weighted F2",
            hm::f_beta{.beta = 2.0, .combination = hm::class_combination::prevalence_weighted}, d,
            agree::exact_unweighted);
        check_parallel<input::labels3>("multiclass MCC", hm::mcc{}, d, agree::exact_unweighted);
        check_parallel<input::labels3>("quadratic kappa", hm::cohen_kappa{hm::kappa_weighting::quadratic}, d,
                                       agree::exact_unweighted);
        check_parallel<input::labels2>("precision", hm::precision{}, d, agree::exact_unweighted);
        check_parallel<input::labels2>("F1", hm::f_beta{}, d, agree::exact_unweighted);
        check_parallel<input::labels2>("MCC", hm::mcc{}, d, agree::exact_unweighted);
    }
    TEST_CASE("every ranking measure: thread-count independent and equal to evaluate()") {
        const data d(12345);
        check_parallel<input::score>("AUC", hm::auc{}, d, agree::exact);
        check_parallel<input::score>("binned AUC", hm::binned_auc{.bins = 128}, d, agree::exact_unweighted);
        check_parallel<input::score>("average precision", hm::average_precision{}, d, agree::exact);
        check_parallel<input::score>("PR AUC", hm::auprc{hm::pr_start::first_precision}, d, agree::exact);
        check_parallel<input::score>("partial AUC", hm::partial_auc{.fpr_low = 0, .fpr_high = 0.2}, d, agree::exact);
        check_parallel<input::score_wide>("AUC, double scores", hm::auc{}, d, agree::exact);
        check_parallel<input::score_wide>("average precision, double scores", hm::average_precision{}, d, agree::exact);
        check_parallel<input::rows3>("multiclass AUC", hm::multiclass_auc{}, d, agree::exact);
        check_parallel<input::rows3>("multiclass AUC one-vs-rest",
                                     hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted}, d,
                                     agree::exact);
    }
    TEST_CASE("errors from worker threads reach the caller with the measure's message") {
        std::vector<double> y(10000, 1.0), f(10000, 1.0);
        f[9000] = std::numeric_limits<double>::quiet_NaN();
        CHECK_THROWS_WITH_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = 2, .chunk = 1000}),
                             "measure MSE: argument 'prediction': not finite (nan) at index 9000",
                             heldout::input_error);
        std::vector<double> shorter(5);
        CHECK_THROWS_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, shorter), heldout::input_error);
        CHECK_THROWS_AS(heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.chunk = 0}), heldout::input_error);
    }
}
