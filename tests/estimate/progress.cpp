// Tests of the progress callbacks on long work: evaluate_splits (serial and threaded, k-fold
// and bootstrap plans with the apparent fit, a range without a size), the bootstrap intervals
// (percentile, BCa, paired, AUC's fast path) and evaluate_parallel. Each must count every
// unit of work, with done increasing and the last call at done == total, and must leave the
// results bit for bit as they are without it; nested_cv_interval likewise (nested CV for
// tuning: tests/estimate/tuning.cpp).
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/estimate/nested_cv.hpp>
#include <heldout/loss/absolute.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/stream/parallel.hpp>

#include "support/line_data.hpp"
#include <doctest/doctest.h>

#include <cstddef>
#include <cstdint>
#include <functional>
#include <mutex>
#include <random>
#include <ranges>
#include <span>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
#include <utility>
#include <vector>

namespace measure = heldout::measure;
using mae = heldout::measure::mean_loss<heldout::loss::absolute>;

namespace {

using heldout_test::line_fit;
using data = heldout_test::line_data;

// Every value in full precision, and every kept prediction: equal strings = equal bits.
std::string exported(const heldout::aggregator& agg) {
    std::ostringstream os;
    heldout::write_json(os, {agg.estimate(measure::mse{}), agg.estimate(mae{})});
    agg.write_predictions_csv(os);
    return os.str();
}

/// Splits of a vector handed out one by one, with no size (an input range that cannot say how
/// many splits it holds until it ends).
struct unsized_splits {
    const std::vector<heldout::owned_split>* owned = nullptr;
    struct iterator {
        using value_type = heldout::split;
        using difference_type = std::ptrdiff_t;
        const heldout::owned_split* at = nullptr;
        heldout::split operator*() const { return at->view(); }
        iterator& operator++() {
            ++at;
            return *this;
        }
        void operator++(int) { ++at; }
        bool operator==(const iterator&) const = default;
    };
    iterator begin() const { return {owned->data()}; }
    iterator end() const { return {owned->data() + owned->size()}; }
};

/// The calls a callback saw; safe to call from several threads (the library serialises them
/// anyway: the lock only keeps the test honest if it did not).
struct ticks {
    std::mutex lock;
    std::vector<std::pair<std::size_t, std::size_t>> calls;
    std::thread::id thread{};
    bool one_thread = true;
    std::function<void(std::size_t, std::size_t)> callback() {
        return [this](std::size_t done, std::size_t total) {
            std::lock_guard<std::mutex> g(lock);
            if (calls.empty())
                thread = std::this_thread::get_id();
            one_thread = one_thread && thread == std::this_thread::get_id();
            calls.emplace_back(done, total);
        };
    }
};

/// done = 1, 2, ..., total, total the same in every call.
void check_counts_up(const ticks& t, std::size_t total) {
    REQUIRE(t.calls.size() == total);
    for (std::size_t i = 0; i < t.calls.size(); ++i) {
        CHECK(t.calls[i].first == i + 1);
        CHECK(t.calls[i].second == total);
    }
    CHECK(t.calls.back().first == t.calls.back().second);
}

bool same(const heldout::bootstrap_result& a, const heldout::bootstrap_result& b) {
    return a.estimate == b.estimate && a.lower == b.lower && a.upper == b.upper && a.level == b.level &&
           a.method == b.method && a.replicates == b.replicates && a.undefined_replicates == b.undefined_replicates &&
           a.z0 == b.z0 && a.acceleration == b.acceleration && a.lower_probability == b.lower_probability &&
           a.upper_probability == b.upper_probability;
}

} // namespace

TEST_SUITE("estimate/progress") {
    TEST_CASE("evaluate_splits: one call per split, serial and threaded, results unchanged") {
        const data D = heldout_test::make_line_data(103, 1);
        const line_fit fit{&D};
        const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 4, .seed = 9};
        const std::string plain =
            exported(heldout::evaluate_splits(plan.splits(D.y.size()), D.y, fit, measure::mse{}, mae{}));
        for (const unsigned threads : {1u, 2u, 3u}) {
            INFO("threads " << threads);
            ticks t;
            const auto agg = heldout::evaluate_splits(
                plan.splits(D.y.size()), D.y, fit,
                heldout::evaluate_options{.threads = threads, .progress = t.callback()}, measure::mse{}, mae{});
            check_counts_up(t, 20);
            if (threads == 1)
                CHECK(t.one_thread);
            CHECK(exported(agg) == plain);
        }
    }

    TEST_CASE("evaluate_splits: a bootstrap plan counts its apparent fit") {
        const data D = heldout_test::make_line_data(40, 2);
        const line_fit fit{&D};
        const auto plan = heldout::bootstrap{.replicates = 25, .seed = 3};
        const auto plain = heldout::evaluate_splits(plan.splits(D.y.size()), D.y, fit, measure::mse{}, mae{});
        for (const unsigned threads : {1u, 2u}) {
            for (const bool apparent : {true, false}) {
                INFO("threads " << threads << ", apparent " << apparent);
                ticks t;
                const auto agg = heldout::evaluate_splits(
                    plan.splits(D.y.size()), D.y, fit,
                    heldout::evaluate_options{.threads = threads, .apparent = apparent, .progress = t.callback()},
                    measure::mse{}, mae{});
                check_counts_up(t, apparent ? 26 : 25);
                if (apparent)
                    CHECK(exported(agg) == exported(plain));
            }
        }
    }

    TEST_CASE("evaluate_splits: a range without a size learns its total at the end") {
        const data D = heldout_test::make_line_data(60, 4);
        const line_fit fit{&D};
        std::vector<heldout::owned_split> owned;
        for (const heldout::split& s : heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 5}.splits(D.y.size()))
            owned.emplace_back(s);
        const unsized_splits unsized{&owned};
        static_assert(!std::ranges::sized_range<decltype(unsized)>);
        ticks t;
        const auto agg = heldout::evaluate_splits(
            unsized, D.y, fit, heldout::evaluate_options{.progress = t.callback()}, measure::mse{}, mae{});
        REQUIRE(t.calls.size() == 7);
        for (std::size_t i = 0; i < 6; ++i)
            CHECK(t.calls[i] == std::make_pair(i + 1, std::size_t{0}));
        CHECK(t.calls.back() == std::make_pair(std::size_t{6}, std::size_t{6}));
        CHECK(exported(agg) == exported(heldout::evaluate_splits(
                                   heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 5}.splits(D.y.size()), D.y,
                                   fit, measure::mse{}, mae{})));
    }

    TEST_CASE("evaluate_splits: an exception from the callback stops the run and reaches the caller") {
        const data D = heldout_test::make_line_data(50, 6);
        const line_fit fit{&D};
        const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 1, .seed = 1};
        for (const unsigned threads : {1u, 2u}) {
            const auto stop = [](std::size_t done, std::size_t) {
                if (done == 2)
                    throw std::runtime_error("cancelled by the user");
            };
            CHECK_THROWS_WITH_AS(heldout::evaluate_splits(
                                     plan.splits(D.y.size()), D.y, fit,
                                     heldout::evaluate_options{.threads = threads, .progress = stop}, measure::mse{}),
                                 "cancelled by the user", std::runtime_error);
        }
    }

    TEST_CASE("bootstrap intervals: one call per replicate, intervals unchanged") {
        const data D = heldout_test::make_line_data(300, 7);
        std::vector<double> f, g, score;
        for (std::size_t i = 0; i < D.y.size(); ++i) {
            f.push_back(1.0 + 2.0 * D.x[i]);
            g.push_back(1.1 + 1.7 * D.x[i]);
            score.push_back(D.x[i]);
        }
        const heldout::bootstrap_options plain{.replicates = 150, .seed = 11, .level = 0.9};
        ticks t;
        heldout::bootstrap_options with = plain;
        with.progress = t.callback();
        auto run = [&](auto&& call) {
            t.calls.clear();
            const auto a = call(plain);
            const auto b = call(with);
            CHECK(same(a, b));
            check_counts_up(t, 150);
            CHECK(t.one_thread);
        };
        run([&](const heldout::bootstrap_options& o) {
            return heldout::bootstrap_percentile(measure::mse{}, D.y, f, o);
        });
        run([&](const heldout::bootstrap_options& o) { return heldout::bootstrap_bca(mae{}, D.y, f, o); });
        run([&](const heldout::bootstrap_options& o) {
            return heldout::paired_bootstrap_bca(measure::mse{}, D.y, f, g, o);
        });
        run([&](const heldout::bootstrap_options& o) {
            return heldout::paired_bootstrap_percentile(measure::mse{}, D.y, f, g, o);
        });
        // AUC's fast path (ranked sample) goes through the same replicate loop
        run([&](const heldout::bootstrap_options& o) {
            return heldout::bootstrap_bca(measure::auc{}, D.label, score, o);
        });
        t.calls.clear();
        const auto set = heldout::bootstrap_replicates(measure::mse{}, D.y, f, with);
        CHECK(set.values == heldout::bootstrap_replicates(measure::mse{}, D.y, f, plain).values);
        check_counts_up(t, 150);
    }

    TEST_CASE("evaluate_parallel: one call per chunk, value unchanged") {
        const data D = heldout_test::make_line_data(10'007, 8);
        std::vector<double> f;
        for (const double x : D.x)
            f.push_back(1.0 + 2.0 * x);
        for (const std::size_t threads : {1u, 2u, 4u}) {
            INFO("threads " << threads);
            ticks t;
            const double plain = heldout::evaluate_parallel(
                measure::mse{}, D.y, f, heldout::parallel_options{.threads = threads, .chunk = 1000});
            const double with = heldout::evaluate_parallel(
                measure::mse{}, D.y, f,
                heldout::parallel_options{.threads = threads, .chunk = 1000, .progress = t.callback()});
            CHECK(with == plain);
            check_counts_up(t, 11); // 10 chunks of 1000 rows and one of 7
        }
    }

    TEST_CASE("nested_cv_interval: one call per fit (R K^2), interval unchanged") {
        const data D = heldout_test::make_line_data(60, 9);
        auto fit_predict = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
            double m = 0;
            for (const std::size_t i : train)
                m += D.y[i];
            return std::vector<double>(test.size(), m / static_cast<double>(train.size()));
        };
        ticks t;
        heldout::nested_cv_options o{.folds = 4, .repeats = 3, .level = 0.9, .seed = 2};
        const auto plain = heldout::nested_cv_interval(fit_predict, D.y, heldout::loss::squared{}, o);
        o.progress = t.callback();
        const auto with = heldout::nested_cv_interval(fit_predict, D.y, heldout::loss::squared{}, o);
        CHECK(with.value == plain.value);
        CHECK(with.lower == plain.lower);
        CHECK(with.upper == plain.upper);
        CHECK(t.one_thread);
        check_counts_up(t, 3 * 4 * 4);
    }
}
