// heldout/estimate/evaluate_splits.hpp — runs the fit / predict / record loop over a plan's
// splits and returns the filled aggregator.
//
//   auto fit_predict = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
//       model m = fit(X, y, train);
//       return m.predict(X, test);              // predictions for the test rows, in their order
//   };
//   heldout::aggregator agg = heldout::evaluate_splits(
//       heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = 1}.splits(n), y, fit_predict,
//       heldout::measure::mse{}, heldout::measure::mae{});
//   std::cout << agg.estimate(heldout::measure::mse{}) << '\n';
//
//   // on two threads (fit_predict is then called concurrently: it must be safe to do so)
//   auto agg2 = heldout::evaluate_splits(plan.splits(n), y, fit_predict,
//                                        heldout::evaluate_options{.threads = 2}, heldout::measure::mse{});
//
// truth is the whole truth vector (rows 0..n-1); the test rows' truth is gathered for each
// split. Splits are recorded in plan order whatever the thread count, so the aggregator —
// and every estimate made from it — is identical for 1 or many threads. With threads > 1
// the splits are copied (owned_split) in batches of 4 per thread, fitted concurrently, and
// recorded in order after each batch; an exception from fit_predict is rethrown from the
// earliest split that failed. For bootstrap plans (splits carrying draw counts) the model is
// also fitted on all rows and scored on all rows, fit_predict(all, all), and recorded with
// record_apparent, which the .632 estimators need (turn off with .apparent = false); a
// bootstrap replicate without out-of-bag rows is not fitted and is counted in skipped().
//
// Progress: options.progress(done, total), if set, after every split is fitted (or skipped
// for want of out-of-bag rows) and after the apparent fit, in fits. total is the number of
// splits, plus 1 for the apparent fit of a bootstrap plan, when the splits have a size
// (every plan's range has); for a range without a size, total is 0 until the last call,
// which repeats done with total = done. done never decreases (it increases by one per call
// for sized ranges) and the last call has done == total. With threads > 1 the callback is
// called from the workers as fits finish, one call at a time. It only observes: the
// aggregator is the same with or without it.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/estimate/aggregator.hpp>

#include <atomic>
#include <cstddef>
#include <exception>
#include <functional>
#include <mutex>
#include <numeric>
#include <optional>
#include <ranges>
#include <span>
#include <string>
#include <thread>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Settings of evaluate_splits.
struct evaluate_options {
    unsigned threads = 1;         ///< worker threads (0: std::thread::hardware_concurrency())
    bool keep_predictions = true; ///< keep the out-of-fold predictions in the aggregator
    bool apparent = true;         ///< bootstrap plans: also fit_predict(all rows, all rows)
    /// Called after every fit with (fits done, fits in all); may be left empty. See the header comment.
    std::function<void(std::size_t done, std::size_t total)> progress{};
};

namespace detail {

template <class T>
void gather_truth(std::span<const T> truth, std::span<const std::size_t> rows, std::vector<T>& out,
                  std::string_view arg) {
    out.resize(rows.size());
    for (std::size_t i = 0; i < rows.size(); ++i) {
        if (rows[i] >= truth.size())
            fail_at("heldout::evaluate_splits", arg,
                    "row " + std::to_string(rows[i]) + " outside the " + std::to_string(truth.size()) +
                        " rows of truth",
                    i);
        out[i] = truth[rows[i]];
    }
}

inline void check_rows(std::span<const std::size_t> rows, std::size_t n, std::string_view arg) {
    for (std::size_t i = 0; i < rows.size(); ++i)
        if (rows[i] >= n)
            fail_at("heldout::evaluate_splits", arg,
                    "row " + std::to_string(rows[i]) + " outside the " + std::to_string(n) + " rows of truth", i);
}

/// Fits done so far, reported to the caller's callback one call at a time.
struct splits_progress {
    const std::function<void(std::size_t, std::size_t)>* callback = nullptr;
    std::optional<std::size_t> splits; // the range's size, when it has one
    std::size_t total = 0;
    std::size_t done = 0;
    bool started = false;
    std::mutex lock;

    // `apparent` (fits after the splits: 0 or 1) is known once the first split has been seen.
    void advance(std::size_t apparent) {
        if (!*callback)
            return;
        std::lock_guard<std::mutex> g(lock);
        if (!started) {
            total = splits ? *splits + apparent : 0;
            started = true;
        }
        ++done;
        (*callback)(done, total);
    }
    // After the last fit: an unsized range learns its total now.
    void finish() {
        if (!*callback || splits)
            return;
        std::lock_guard<std::mutex> g(lock);
        (*callback)(done, done);
    }
};

template <class F>
using fit_result_t =
    std::remove_cvref_t<std::invoke_result_t<F&, std::span<const std::size_t>, std::span<const std::size_t>>>;

} // namespace detail

/// Fits and scores every split, recording into a new aggregator tracking `measures`.
template <std::ranges::input_range Splits, value_range T, class F, outer_measure... Ms>
requires std::invocable<F&, std::span<const std::size_t>, std::span<const std::size_t>>
    aggregator evaluate_splits(Splits&& splits, const T& truth, F&& fit_predict, const evaluate_options& options,
                               const Ms&... measures) {
    constexpr std::string_view who = "heldout::evaluate_splits";
    using E = element_t<T>;
    const auto y = values_of(truth, who, "truth");
    detail::check_nonempty(who, "truth", y.size());
    aggregator agg(measures...);
    agg.keep_predictions(options.keep_predictions);
    unsigned threads = options.threads == 0 ? std::thread::hardware_concurrency() : options.threads;
    if (threads == 0)
        threads = 1;

    detail::splits_progress progress;
    progress.callback = &options.progress;
    if constexpr (std::ranges::sized_range<Splits>)
        progress.splits = static_cast<std::size_t>(std::ranges::size(splits));

    std::vector<E> test_truth;
    bool bootstrap = false;
    std::size_t bootstrap_rows = 0;
    // A bootstrap replicate that drew every row has nothing to score: not fitted, counted.
    auto no_out_of_bag = [](const split& s) { return s.test.empty() && !s.counts.empty(); };
    auto apparent_fits = [&]() -> std::size_t { return bootstrap && options.apparent ? 1 : 0; };
    auto note_split = [&](const split& s) {
        detail::check_rows(s.train, y.size(), "split.train");
        if (!s.counts.empty()) {
            bootstrap = true;
            bootstrap_rows = s.counts.size();
        }
    };

    if (threads == 1) {
        for (const split& s : splits) {
            note_split(s);
            if (no_out_of_bag(s)) {
                agg.record(s, std::span<const E>(), std::span<const double>()); // counted as skipped
                progress.advance(apparent_fits());
                continue;
            }
            detail::gather_truth(y, s.test, test_truth, "split.test");
            const auto predictions = fit_predict(s.train, s.test);
            agg.record(s, test_truth, predictions);
            progress.advance(apparent_fits());
        }
    } else {
        using R = detail::fit_result_t<F>;
        const std::size_t batch_size = 4 * static_cast<std::size_t>(threads);
        std::vector<owned_split> batch;
        std::vector<std::optional<R>> results;
        std::vector<std::exception_ptr> errors;
        auto run_batch = [&] {
            results.clear();
            results.resize(batch.size());
            errors.assign(batch.size(), nullptr);
            std::atomic<std::size_t> next{0};
            auto work = [&] {
                for (std::size_t i = next++; i < batch.size(); i = next++) {
                    try {
                        if (!no_out_of_bag(batch[i].view()))
                            results[i].emplace(fit_predict(std::span<const std::size_t>(batch[i].train),
                                                           std::span<const std::size_t>(batch[i].test)));
                        progress.advance(apparent_fits());
                    } catch (...) {
                        errors[i] = std::current_exception();
                    }
                }
            };
            const std::size_t workers = std::min<std::size_t>(threads, batch.size());
            std::vector<std::thread> pool;
            pool.reserve(workers);
            for (std::size_t w = 0; w < workers; ++w)
                pool.emplace_back(work);
            for (auto& t : pool)
                t.join();
            for (std::size_t i = 0; i < batch.size(); ++i) {
                if (errors[i])
                    std::rethrow_exception(errors[i]);
                const split v = batch[i].view();
                if (no_out_of_bag(v)) {
                    agg.record(v, std::span<const E>(), std::span<const double>());
                    continue;
                }
                detail::gather_truth(y, v.test, test_truth, "split.test");
                agg.record(v, test_truth, *results[i]);
            }
            batch.clear();
        };
        for (const split& s : splits) {
            note_split(s);
            detail::check_rows(s.test, y.size(), "split.test");
            batch.emplace_back(s);
            if (batch.size() == batch_size)
                run_batch();
        }
        if (!batch.empty())
            run_batch();
    }

    if (bootstrap && options.apparent) {
        if (bootstrap_rows != y.size())
            detail::fail(who, "truth",
                         "the bootstrap splits cover " + std::to_string(bootstrap_rows) + " rows, truth has " +
                             std::to_string(y.size()));
        std::vector<std::size_t> all(y.size());
        std::iota(all.begin(), all.end(), std::size_t{0});
        const auto predictions = fit_predict(std::span<const std::size_t>(all), std::span<const std::size_t>(all));
        agg.record_apparent(y, predictions);
        progress.advance(apparent_fits());
    }
    progress.finish();
    return agg;
}

/// The same with default options (one thread, predictions kept).
template <std::ranges::input_range Splits, value_range T, class F, outer_measure... Ms>
requires std::invocable<F&, std::span<const std::size_t>, std::span<const std::size_t>>
    aggregator evaluate_splits(Splits&& splits, const T& truth, F&& fit_predict, const Ms&... measures) {
    return evaluate_splits(std::forward<Splits>(splits), truth, std::forward<F>(fit_predict), evaluate_options{},
                           measures...);
}

HELDOUT_NAMESPACE_END
