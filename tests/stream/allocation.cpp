// After the first pass no heap allocation: a second epoch of reset / add batches / value on
// every accumulator of every measure family must not call the global operator new (counted
// by replacing it here; the whole test binary shares the replacement, which only counts).
#include "stream/cases.hpp"

#include <heldout/loss/absolute.hpp>
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
#include <heldout/measure/confusion_matrix.hpp>
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
#include <heldout/stream/early_stopping.hpp>

#include <doctest/doctest.h>

#include <atomic>
#include <cstdlib>
#include <new>
#include <string>

namespace {
std::atomic<std::size_t> g_allocations{0};
} // namespace

void* operator new(std::size_t n) {
    ++g_allocations;
    if (void* p = std::malloc(n ? n : 1))
        return p;
    throw std::bad_alloc();
}
void* operator new[](std::size_t n) {
    ++g_allocations;
    if (void* p = std::malloc(n ? n : 1))
        return p;
    throw std::bad_alloc();
}
// Every form is replaced, so that each allocation and its release go through malloc/free
// (the standard library's temporary buffers use the nothrow form; over-aligned types the
// aligned one) — a partial replacement mixes allocators, which ASan rightly reports.
void* operator new(std::size_t n, const std::nothrow_t&) noexcept {
    ++g_allocations;
    return std::malloc(n ? n : 1);
}
void* operator new[](std::size_t n, const std::nothrow_t&) noexcept {
    ++g_allocations;
    return std::malloc(n ? n : 1);
}
void* operator new(std::size_t n, std::align_val_t a) {
    ++g_allocations;
    const std::size_t al = static_cast<std::size_t>(a);
    if (void* p = std::aligned_alloc(al, (n + al - 1) / al * al))
        return p;
    throw std::bad_alloc();
}
void* operator new[](std::size_t n, std::align_val_t a) { return operator new(n, a); }
void* operator new(std::size_t n, std::align_val_t a, const std::nothrow_t&) noexcept {
    ++g_allocations;
    const std::size_t al = static_cast<std::size_t>(a);
    return std::aligned_alloc(al, (n + al - 1) / al * al);
}
void* operator new[](std::size_t n, std::align_val_t a, const std::nothrow_t& t) noexcept {
    return operator new(n, a, t);
}
void operator delete(void* p) noexcept { std::free(p); }
void operator delete[](void* p) noexcept { std::free(p); }
void operator delete(void* p, std::size_t) noexcept { std::free(p); }
void operator delete[](void* p, std::size_t) noexcept { std::free(p); }
void operator delete(void* p, const std::nothrow_t&) noexcept { std::free(p); }
void operator delete[](void* p, const std::nothrow_t&) noexcept { std::free(p); }
void operator delete(void* p, std::align_val_t) noexcept { std::free(p); }
void operator delete[](void* p, std::align_val_t) noexcept { std::free(p); }
void operator delete(void* p, std::size_t, std::align_val_t) noexcept { std::free(p); }
void operator delete[](void* p, std::size_t, std::align_val_t) noexcept { std::free(p); }
void operator delete(void* p, std::align_val_t, const std::nothrow_t&) noexcept { std::free(p); }
void operator delete[](void* p, std::align_val_t, const std::nothrow_t&) noexcept { std::free(p); }

namespace {
using namespace stream_cases;
namespace hm = heldout::measure;

/// Reads what the accumulator reports without making a result object: a confusion table's
/// value() returns an Eigen matrix (a new table by design), so its cells are read instead.
template <class Acc>
double touch(const Acc& acc) {
    if constexpr (std::convertible_to<decltype(acc.value()), double>) {
        double v = acc.value();
        if constexpr (requires { acc.error_bound(); })
            v += acc.error_bound();
        return v;
    } else {
        double s = 0;
        for (std::size_t i = 0; i < acc.classes(); ++i)
            for (std::size_t j = 0; j < acc.classes(); ++j)
                s += acc(i, j);
        return s;
    }
}

/// One epoch: reset, batches of `batch` rows, then the value.
template <input K, class Acc>
void epoch(Acc& acc, const data& d, bool weighted, std::size_t batch) {
    acc.reset();
    for (std::size_t first = 0; first < d.n; first += batch)
        feed<K>(acc, d, first, std::min(batch, d.n - first), weighted);
    volatile double v = touch(acc);
    (void)v;
}

/// Allocations made by the second epoch of a fresh accumulator of m.
template <input K, class M>
std::size_t second_epoch(const M& m, const data& d, bool weighted) {
    auto acc = m.accumulator();
    epoch<K>(acc, d, weighted, 1000);
    const std::size_t before = g_allocations.load();
    epoch<K>(acc, d, weighted, 1000);
    return g_allocations.load() - before;
}

template <input K, class M>
void check_no_allocation(const std::string& label, const M& m, const data& d) {
    const std::size_t plain = second_epoch<K>(m, d, false);
    const std::size_t weighted = second_epoch<K>(m, d, true);
    INFO("measure: " << label);
    CHECK(plain == 0);
    CHECK(weighted == 0);
}

} // namespace

TEST_SUITE("stream/allocation") {
    TEST_CASE("pointwise accumulators: no allocation in a second epoch") {
        const data d(20000);
        check_no_allocation<input::real>("MSE", hm::mse{}, d);
        check_no_allocation<input::real>("MAE", hm::mae{}, d);
        check_no_allocation<input::real>("RMSE", hm::rmse{}, d);
        check_no_allocation<input::real>("R-squared", hm::r_squared{}, d);
        check_no_allocation<input::real>("max absolute error", hm::max_absolute_error{}, d);
        check_no_allocation<input::real>("median absolute error", hm::median_absolute_error{}, d);
        check_no_allocation<input::real>("mean Huber", hm::mean_loss<heldout::loss::huber>{{1.5}}, d);
        check_no_allocation<input::real>("mean pinball", hm::mean_loss<heldout::loss::pinball>{{0.9}}, d);
        check_no_allocation<input::counts>("mean Poisson", hm::mean_loss<heldout::loss::poisson>{}, d);
        check_no_allocation<input::margin>("mean logistic", hm::mean_loss<heldout::loss::logistic>{}, d);
        check_no_allocation<input::margin>("mean hinge", hm::mean_loss<heldout::loss::hinge>{}, d);
        check_no_allocation<input::margin>("mean 0-1", hm::mean_loss<heldout::loss::zero_one>{{0.2}}, d);
    }
    TEST_CASE("probability accumulators: no allocation in a second epoch") {
        const data d(20000);
        check_no_allocation<input::probability>("Brier", hm::brier_score{}, d);
        check_no_allocation<input::probability>("cross-entropy", hm::cross_entropy{1e-12}, d);
        check_no_allocation<input::probability>("ECE equal width", hm::calibration_error{}, d);
        check_no_allocation<input::probability>(
            "ECE equal count", hm::calibration_error{.bins = 10, .binning = hm::bin_rule::equal_count}, d);
        check_no_allocation<input::probability>("MCE top label",
                                                hm::calibration_error{.variant = hm::calibration_variant::top_label,
                                                                      .statistic = hm::calibration_statistic::maximum},
                                                d);
        check_no_allocation<input::rows3>("multiclass Brier", hm::multiclass_brier_score{}, d);
        check_no_allocation<input::rows3>("multiclass cross-entropy", hm::multiclass_cross_entropy{1e-9}, d);
        check_no_allocation<input::rows3>("multiclass ECE", hm::multiclass_calibration_error{}, d);
        check_no_allocation<input::rows3>("multiclass ECE equal count",
                                          hm::multiclass_calibration_error{.binning = hm::bin_rule::equal_count}, d);
    }
    TEST_CASE("label accumulators: no allocation in a second epoch") {
        const data d(20000);
        check_no_allocation<input::labels3>("confusion matrix, 4 classes", hm::confusion_matrix{.classes = 4}, d);
        check_no_allocation<input::labels3>("classification error", hm::classification_error{}, d);
        check_no_allocation<input::labels3>("accuracy", hm::accuracy{.classes = 3}, d);
        check_no_allocation<input::labels3>("confusion matrix", hm::confusion_matrix{}, d);
        check_no_allocation<input::labels3>("balanced accuracy", hm::balanced_accuracy{}, d);
        check_no_allocation<input::labels3>("cost-weighted error", hm::cost_weighted_error{costs3()}, d);
        check_no_allocation<input::labels3>("mean precision", hm::precision{.combination = hm::class_combination::mean},
                                            d);
        check_no_allocation<input::labels3>("pooled recall", hm::recall{.combination = hm::class_combination::pooled},
                                            d);
        check_no_allocation<input::labels3>(
            "specificity of class 2", hm::specificity{.combination = hm::class_combination::one_vs_rest, .positive = 2},
            d);
        check_no_allocation<input::labels3>(
            "prevalence-weighted F2",
            hm::f_beta{.beta = 2.0, .combination = hm::class_combination::prevalence_weighted}, d);
        check_no_allocation<input::labels3>("multiclass MCC", hm::mcc{}, d);
        check_no_allocation<input::labels3>("quadratic kappa", hm::cohen_kappa{hm::kappa_weighting::quadratic}, d);
        check_no_allocation<input::labels2>("precision", hm::precision{}, d);
        check_no_allocation<input::labels2>("recall", hm::recall{}, d);
        check_no_allocation<input::labels2>("F1", hm::f_beta{}, d);
        check_no_allocation<input::labels2>("MCC", hm::mcc{}, d);
        check_no_allocation<input::labels2>("kappa", hm::cohen_kappa{}, d);
    }
    TEST_CASE("ranking accumulators: no allocation in a second epoch") {
        const data d(20000);
        check_no_allocation<input::score>("AUC", hm::auc{}, d);
        check_no_allocation<input::score_wide>("AUC, double scores", hm::auc{}, d);
        check_no_allocation<input::score>("binned AUC", hm::binned_auc{.bins = 512}, d);
        check_no_allocation<input::rows3>("multiclass AUC", hm::multiclass_auc{}, d);
        check_no_allocation<input::rows3>("multiclass AUC one-vs-rest",
                                          hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted}, d);
        check_no_allocation<input::score>("average precision", hm::average_precision{}, d);
        check_no_allocation<input::score>("PR AUC", hm::auprc{hm::pr_start::first_precision}, d);
        check_no_allocation<input::score>("partial AUC",
                                          hm::partial_auc{.fpr_low = 0, .fpr_high = 0.2, .standardized = true}, d);
    }
    TEST_CASE("early stopping updates do not allocate") {
        heldout::early_stopping stop{heldout::measure::mse{}, {.patience = 5}};
        const std::size_t before = g_allocations.load();
        for (int e = 0; e < 100; ++e)
            stop.update(1.0 / (1 + e % 7));
        CHECK(g_allocations.load() - before == 0);
    }
}
