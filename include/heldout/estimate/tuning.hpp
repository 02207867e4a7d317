// heldout/estimate/tuning.hpp — honest tuning: the error of a whole selection procedure
// (try every candidate setting on inner splits, keep the best, refit it), measured on outer
// test rows the selection never saw, and the optimism of reporting the best inner value.
//
//   auto fit_predict = [&](std::size_t candidate, std::span<const std::size_t> train,
//                          std::span<const std::size_t> test) {
//       model m = fit(X, y, train, settings[candidate]);
//       return m.predict(X, test);                 // predictions for the test rows, in their order
//   };
//   heldout::tuned_result r = heldout::evaluate_tuned(
//       heldout::kfold{.folds = 10, .seed = 1}.splits(heldout::strata(y)),   // outer: assessment
//       heldout::kfold{.folds = 5, .seed = 2},                              // inner: selection
//       settings.size(), y, fit_predict, heldout::measure::classification_error{},
//       {.threads = 2});                           // prints the cost in fits to std::clog first
//   std::cout << r << '\n';                        // outer estimate, inner best, optimism, choices
//   r.outer.value; r.outer.lower; r.chosen[3]; r.inner_best; r.optimism; r.selection_counts;
//   r.inner_value(3, 7);                           // inner value of candidate 7 in outer split 3
//
// The procedure, for each outer split o (in split order; Varma & Simon 2006, Cawley &
// Talbot 2010: selection must be redone inside every outer training set):
//  1. the inner plan is applied to o.train: the inner plan sees the m training rows as rows
//     0..m-1 (ascending o.train order) and its splits are mapped back to original row
//     numbers, so inner rows never touch o.test. When the truth is integral (class labels)
//     and the inner plan takes heldout::strata, the inner plan is stratified by the truth of
//     the training rows (turn off with .stratify = false); otherwise it gets the row count.
//  2. every candidate c = 0..candidates-1 is fitted and scored on every inner split:
//     fit_predict(c, inner train, inner test); its inner value is the mean of its
//     per-inner-split values (heldout::evaluate of the measure on each inner test set).
//     Inner splits on which the measure is undefined for c are left out of c's mean (and
//     counted in notes); a candidate undefined on every inner split cannot be chosen.
//  3. the candidate with the best inner value by the measure's direction is chosen; ties
//     go to the lowest candidate index (the order of the candidates is the caller's
//     preference order: list the simplest setting first).
//  4. the chosen candidate is refitted on the whole of o.train and scored on o.test:
//     fit_predict(chosen, o.train, o.test). These outer predictions are recorded into an
//     aggregator, whose default interval for the outer plan is `outer` (k-fold outside:
//     Nadeau-Bengio corrected t; one holdout split: Wilson for an error rate, ...).
// inner_best is the mean over outer splits of the chosen candidate's inner value, what
// reporting the best tuned figure would show; optimism = outer.value - inner_best for a
// lower-is-better measure, inner_best - outer.value for a higher-is-better one, and
// |outer.value - ideal| - |inner_best - ideal| for a measure with an ideal value, so a
// positive optimism is the selection bias the nested evaluation removed.
//
// Cost: outer x (inner x candidates + 1) fits (the sum over outer splits when the inner
// count varies), checked and printed before any fit to options.cost_stream (default
// std::clog, nullptr for silence), returned in tuned_result::cost, and available up front
// from heldout::tuning_fits. Progress: options.progress(done, total) after every fit, in
// fits; with threads > 1 it is called from the workers, one call at a time, done strictly
// increasing. Threads: outer splits run in parallel (fit_predict is then called
// concurrently and must be safe so); the result is identical to the serial one, and an
// exception is rethrown from the earliest outer split that failed.
//
// Bad input -> heldout::input_error naming the argument and the outer split: no
// candidates; truth size different from the outer plan's rows; an outer split that is a
// bootstrap sample (duplicated rows would fall on both inner sides) or has no training or
// test rows; an inner plan impossible on an outer training set (more folds than rows, a
// stratum smaller than the folds); predictions of the wrong size. The measure undefined
// for every candidate on every inner split of an outer split -> heldout::undefined_error.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/structure.hpp>

#include <algorithm>
#include <atomic>
#include <concepts>
#include <cstddef>
#include <exception>
#include <functional>
#include <iostream>
#include <mutex>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <thread>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// The number of fits a tuned evaluation makes.
struct tuning_cost {
    std::size_t outer_splits = 0; ///< outer splits
    std::size_t inner_splits = 0; ///< inner splits, summed over the outer splits
    std::size_t candidates = 0;   ///< candidate settings
    std::size_t fits = 0;         ///< inner_splits * candidates + outer_splits (one refit per outer split)
    /// Inner splits per outer split when every outer split has the same number, else 0.
    std::size_t inner_per_outer = 0;
};

/// "5 outer splits x (5 inner splits x 20 candidates + 1 refit) = 505 fits".
inline std::string describe(const tuning_cost& c) {
    const auto plural = [](std::size_t k, std::string_view one) {
        return std::to_string(k) + " " + std::string(one) + (k == 1 ? "" : "s");
    };
    if (c.inner_per_outer != 0 || c.inner_splits == 0)
        return plural(c.outer_splits, "outer split") + " x (" + plural(c.inner_per_outer, "inner split") + " x " +
               plural(c.candidates, "candidate") + " + 1 refit) = " + plural(c.fits, "fit");
    return plural(c.outer_splits, "outer split") + ", " + plural(c.inner_splits, "inner split") + " in all, " +
           plural(c.candidates, "candidate") + ": " + std::to_string(c.inner_splits) + " x " +
           std::to_string(c.candidates) + " + " + std::to_string(c.outer_splits) + " refits = " + plural(c.fits, "fit");
}

inline std::ostream& operator<<(std::ostream& os, const tuning_cost& c) { return os << describe(c); }

/// Settings of evaluate_tuned (designated initialisers: `{.threads = 2, .cost_stream = nullptr}`).
struct tuning_options {
    unsigned threads = 1; ///< workers over outer splits (0: std::thread::hardware_concurrency())
    /// Called after every fit with (fits done, fits in all); may be left empty.
    std::function<void(std::size_t done, std::size_t total)> progress{};
    std::ostream* cost_stream = &std::clog; ///< where the cost line is printed before any fit; nullptr: nowhere
    bool stratify = true;                   ///< stratify the inner plan by integral truth when it takes strata
    ci::method method = ci::automatic;      ///< interval method of the outer estimate
    double level = 0.95;                    ///< its confidence level
};

/// What evaluate_tuned found; see the header comment.
struct tuned_result {
    heldout::estimate outer;         ///< the whole procedure's estimate on the outer test rows, with its interval
    std::vector<std::size_t> chosen; ///< the candidate chosen in each outer split, in split order
    double inner_best = 0;           ///< mean over outer splits of the chosen candidate's inner value
    double optimism = 0;             ///< selection bias removed: outer - inner_best (lower is better), else reversed
    direction better = direction::lower_is_better; ///< the measure's direction
    std::size_t candidates = 0;                    ///< number of candidates
    /// Inner value of every candidate in every outer split, outer-split major
    /// (inner_values[i * candidates + c]); absent where undefined on every inner split.
    std::vector<std::optional<double>> inner_values;
    std::vector<std::size_t> selection_counts; ///< how often each candidate was chosen
    std::size_t ties = 0;                      ///< outer splits where the best inner value was shared
    std::size_t undefined_inner = 0;           ///< (candidate, inner split) values undefined, left out
    tuning_cost cost;                          ///< fits planned
    std::size_t fits = 0;                      ///< fits made (fewer than cost.fits only for empty inner test sets)
    heldout::aggregator recorded;   ///< the outer predictions (chosen candidate, refitted), for more measures
    std::vector<std::string> notes; ///< what the reader must know

    /// Inner value of `candidate` in outer split `split` (absent when undefined there).
    std::optional<double> inner_value(std::size_t split, std::size_t candidate) const {
        if (split >= chosen.size() || candidate >= candidates)
            detail::fail("heldout::tuned_result::inner_value", split >= chosen.size() ? "split" : "candidate",
                         "out of range (" + std::to_string(chosen.size()) + " outer splits, " +
                             std::to_string(candidates) + " candidates)");
        return inner_values[split * candidates + candidate];
    }
    /// The candidate chosen most often (the lowest index among equals).
    std::size_t most_chosen() const {
        return static_cast<std::size_t>(std::max_element(selection_counts.begin(), selection_counts.end()) -
                                        selection_counts.begin());
    }
    /// Share of outer splits that chose most_chosen(): 1 when the selection is stable.
    double stability() const {
        return chosen.empty()
                   ? 0.0
                   : static_cast<double>(selection_counts[most_chosen()]) / static_cast<double>(chosen.size());
    }
    /// Number of different candidates chosen over the outer splits.
    std::size_t distinct_chosen() const {
        return static_cast<std::size_t>(
            std::count_if(selection_counts.begin(), selection_counts.end(), [](std::size_t k) { return k > 0; }));
    }
};

/// Three lines: the outer estimate; inner best and optimism; the choices.
inline std::ostream& operator<<(std::ostream& os, const tuned_result& r) {
    os << r.outer << '\n'
       << "  tuned over " << r.candidates << (r.candidates == 1 ? " candidate, " : " candidates, ") << r.fits
       << " fits; best inner value " << detail::readable_number(r.inner_best) << ", optimism "
       << detail::readable_number(r.optimism) << '\n'
       << "  chosen:";
    std::vector<std::size_t> order;
    for (std::size_t c = 0; c < r.selection_counts.size(); ++c)
        if (r.selection_counts[c] > 0)
            order.push_back(c);
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return r.selection_counts[a] > r.selection_counts[b]; });
    for (std::size_t j = 0; j < order.size(); ++j)
        os << (j ? ", " : " ") << "candidate " << order[j] << " x" << r.selection_counts[order[j]];
    return os << " (" << r.distinct_chosen() << " distinct in " << r.chosen.size() << " outer splits)";
}

namespace detail {

inline constexpr std::string_view tuned_who = "heldout::evaluate_tuned";

inline std::string outer_label(const split& s) {
    return "outer split " + std::to_string(s.index) + " (repeat " + std::to_string(s.repeat) + ", fold " +
           std::to_string(s.fold) + ")";
}

/// The outer split must be one an inner plan can run inside.
inline void check_outer_split(const split& s) {
    if (!s.counts.empty())
        fail(tuned_who, "outer_splits",
             outer_label(s) + " is a bootstrap sample: its duplicated rows would fall on both sides of the inner "
                              "splits; use k-fold, repeated k-fold, holdout or subsampling outside");
    if (s.train.empty())
        fail(tuned_who, "outer_splits", outer_label(s) + " has no training rows");
    if (s.test.empty())
        fail(tuned_who, "outer_splits", outer_label(s) + " has no test rows");
}

/// Builds the inner plan's range on the m training rows of outer split s (stratified when
/// `st` is given and the plan takes strata) and calls f(range). Plan errors name the split.
template <class P, class F>
void with_inner_range(const P& plan, const strata* st, const split& s, F&& f) {
    auto build = [&](auto make) {
        try {
            return make();
        } catch (const input_error& e) {
            fail(tuned_who, "inner_plan",
                 "impossible on the training set of " + outer_label(s) + " (" + std::to_string(s.train.size()) +
                     " rows" + (st ? ", stratified by the truth" : "") + "): " + e.what() +
                     (st ? "; use fewer inner folds, or .stratify = false" : ""));
        }
    };
    if constexpr (split_plan<P, strata>) {
        if (st) {
            auto r = build([&] { return plan.splits(st->subset(s.train)); });
            f(r);
            return;
        }
    }
    auto r = build([&] { return plan.splits(s.train.size()); });
    f(r);
}

template <class F>
using tuned_prediction_t = std::remove_cvref_t<
    std::invoke_result_t<F&, std::size_t, std::span<const std::size_t>, std::span<const std::size_t>>>;

/// Fits made so far, reported to the caller's callback one call at a time.
struct tuning_progress {
    const std::function<void(std::size_t, std::size_t)>* callback = nullptr;
    std::size_t total = 0;
    std::size_t done = 0;
    std::mutex lock;

    void advance(std::size_t k) {
        if (!callback || !*callback)
            return;
        std::lock_guard<std::mutex> g(lock);
        done += k;
        (*callback)(done, total);
    }
};

/// What one outer split gave.
template <class R>
struct outer_outcome {
    std::vector<std::optional<double>> inner; // per candidate
    std::size_t chosen = 0;
    bool tie = false;
    std::size_t undefined = 0;
    std::size_t fits = 0;
    std::string undefined_reason;
    std::optional<R> predictions; // of the chosen candidate on the outer test rows
};

inline std::string undefined_text(const undefined_error& e) { return e.problem(); }

/// Steps 1-4 of the header comment for one outer split.
template <class R, class P, class E, class F, class M>
outer_outcome<R> run_outer_split(const split& o, const P& inner_plan, const strata* st, std::size_t candidates,
                                 std::span<const E> y, F& fit_predict, const M& measure, tuning_progress& progress) {
    outer_outcome<R> out;
    std::vector<double> sum(candidates, 0.0);
    std::vector<std::size_t> count(candidates, 0);
    std::vector<std::size_t> train, test;
    std::vector<E> truth;

    auto checked_size = [&](const R& p, std::size_t expected, std::size_t c, const std::string& where) {
        if (input_rows(p) != expected)
            fail(tuned_who, "fit_predict",
                 "candidate " + std::to_string(c) + " on " + where + ": " + std::to_string(input_rows(p)) +
                     " predictions for " + std::to_string(expected) + " test rows");
    };

    with_inner_range(inner_plan, st, o, [&](auto& inner) {
        for (std::size_t j = 0; j < inner.size(); ++j) {
            const split& s = inner.split(j);
            if (s.test.empty()) { // a bootstrap replicate that drew every row: nothing to score
                progress.advance(candidates);
                continue;
            }
            train.resize(s.train.size());
            test.resize(s.test.size());
            truth.resize(s.test.size());
            for (std::size_t k = 0; k < s.train.size(); ++k)
                train[k] = o.train[s.train[k]];
            for (std::size_t k = 0; k < s.test.size(); ++k) {
                test[k] = o.train[s.test[k]];
                truth[k] = y[test[k]];
            }
            const std::string where = "inner split " + std::to_string(j) + " of " + outer_label(o);
            for (std::size_t c = 0; c < candidates; ++c) {
                const R p = fit_predict(c, std::span<const std::size_t>(train), std::span<const std::size_t>(test));
                ++out.fits;
                checked_size(p, test.size(), c, where);
                try {
                    sum[c] += heldout::evaluate(measure, std::span<const E>(truth), p);
                    ++count[c];
                } catch (const undefined_error& e) {
                    ++out.undefined;
                    if (out.undefined_reason.empty())
                        out.undefined_reason = undefined_text(e);
                } catch (const input_error& e) {
                    fail(tuned_who, "fit_predict", "candidate " + std::to_string(c) + " on " + where + ": " + e.what());
                }
                progress.advance(1);
            }
        }
    });

    out.inner.resize(candidates);
    std::optional<std::size_t> best;
    for (std::size_t c = 0; c < candidates; ++c) {
        if (count[c] == 0)
            continue;
        const double v = sum[c] / static_cast<double>(count[c]);
        out.inner[c] = v;
        // Strictly better only: among equal values the lowest index stays chosen.
        if (!best || measure_traits<M>::better_value(v, *out.inner[*best]))
            best = c;
    }
    if (!best)
        fail_undefined(tuned_who, "measure " + measure.name() +
                                      " is undefined for every candidate on every inner "
                                      "split of " +
                                      outer_label(o) +
                                      (out.undefined_reason.empty() ? "" : " (" + out.undefined_reason + ")"));
    out.chosen = *best;
    for (std::size_t c = 0; c < candidates; ++c)
        out.tie = out.tie || (c != *best && out.inner[c] && *out.inner[c] == *out.inner[*best]);

    out.predictions.emplace(fit_predict(out.chosen, o.train, o.test));
    ++out.fits;
    checked_size(*out.predictions, o.test.size(), out.chosen, "the training set of " + outer_label(o) + " (refit)");
    progress.advance(1);
    return out;
}

/// The plan's name for notes ("heldout::kfold"), when it declares one.
template <class P>
constexpr std::string_view plan_name() {
    if constexpr (requires { std::string_view(P::name); })
        return P::name;
    else
        return "the inner plan";
}

template <class E>
std::optional<strata> tuning_strata(std::span<const E> y, bool stratify) {
    if constexpr (std::integral<E>) {
        if (stratify)
            return strata(y);
    }
    return std::nullopt;
}

template <class Splits, class P, class E>
tuning_cost tuning_fits_of(Splits& outer, const P& inner_plan, std::size_t candidates, std::span<const E> y,
                           const strata* st) {
    if (candidates == 0)
        fail(tuned_who, "candidates", "no candidates: need at least 1 setting to choose from");
    check_same_size(tuned_who, "truth", outer.rows(), y.size(), "outer_splits");
    tuning_cost c;
    c.candidates = candidates;
    c.outer_splits = outer.size();
    if (c.outer_splits == 0)
        fail(tuned_who, "outer_splits", "no outer splits");
    bool uniform = true;
    std::size_t first = 0;
    for (std::size_t i = 0; i < outer.size(); ++i) {
        const split& o = outer.split(i);
        check_outer_split(o);
        with_inner_range(inner_plan, st, o, [&](auto& inner) {
            const std::size_t k = inner.size();
            if (k == 0)
                fail(tuned_who, "inner_plan", "no inner splits on the training set of " + outer_label(o));
            if (i == 0)
                first = k;
            uniform = uniform && k == first;
            c.inner_splits += k;
        });
    }
    c.inner_per_outer = uniform ? first : 0;
    c.fits = c.inner_splits * candidates + c.outer_splits;
    return c;
}

/// The outer estimate without an interval, when the aggregator finds the interval undefined.
template <class M>
estimate point_only(const aggregator& agg, const M& m, const tuning_options& options, const undefined_error& why) {
    estimate e;
    e.measure = m.name();
    e.level = options.level;
    e.method = options.method.id;
    e.method_label = "interval undefined";
    e.per_split = agg.split_values(m);
    double sum = 0;
    for (const auto& s : e.per_split)
        if (s.value) {
            sum += *s.value;
            ++e.splits;
            e.observations += s.test_size;
        }
    if (e.splits == 0)
        throw why; // undefined on every outer split: nothing to report
    e.value = sum / static_cast<double>(e.splits);
    e.notes.push_back("no interval: " + undefined_text(why) + "; value is the mean of the " + std::to_string(e.splits) +
                      " defined outer split values; pooled value not computed");
    return e;
}

} // namespace detail

/// The cost of evaluate_tuned with these arguments, in fits, without fitting anything; the
/// same checks of the splits, the inner plan and the truth (and the same errors) as there.
template <class Splits, class InnerPlan, value_range T>
requires split_source<std::remove_reference_t<Splits>> tuning_cost tuning_fits(Splits&& outer_splits,
                                                                               const InnerPlan& inner_plan,
                                                                               std::size_t candidates, const T& truth,
                                                                               bool stratify = true) {
    const auto y = values_of(truth, detail::tuned_who, "truth");
    const auto st = detail::tuning_strata(y, stratify);
    return detail::tuning_fits_of(outer_splits, inner_plan, candidates, y, st ? &*st : nullptr);
}

/// Nested evaluation of choosing among `candidates` settings by `inner_plan` inside every
/// outer training set; see the header comment.
template <class Splits, class InnerPlan, value_range T, class F, outer_measure M>
requires split_source<std::remove_reference_t<Splits>> &&
    std::invocable<F&, std::size_t, std::span<const std::size_t>, std::span<const std::size_t>>
        tuned_result evaluate_tuned(Splits&& outer_splits, const InnerPlan& inner_plan, std::size_t candidates,
                                    const T& truth, F&& fit_predict, const M& measure,
                                    const tuning_options& options = {}) {
    using E = element_t<T>;
    using R = detail::tuned_prediction_t<F>;
    constexpr std::string_view who = detail::tuned_who;
    auto& outer = outer_splits;
    const auto y = values_of(truth, who, "truth");
    const auto st = detail::tuning_strata(y, options.stratify);
    const strata* stp = st ? &*st : nullptr;

    tuned_result res;
    res.cost = detail::tuning_fits_of(outer, inner_plan, candidates, y, stp);
    if (options.cost_stream)
        *options.cost_stream << who << ": " << describe(res.cost) << '\n' << std::flush;

    const std::size_t J = outer.size();
    detail::tuning_progress progress;
    progress.callback = &options.progress;
    progress.total = res.cost.fits;

    std::vector<detail::outer_outcome<R>> outcomes(J);
    unsigned threads = options.threads == 0 ? std::thread::hardware_concurrency() : options.threads;
    if (threads == 0)
        threads = 1;
    const std::size_t workers = std::min<std::size_t>(threads, J);
    if (workers <= 1) {
        for (std::size_t i = 0; i < J; ++i)
            outcomes[i] = detail::run_outer_split<R>(outer.split(i), inner_plan, stp, candidates, y, fit_predict,
                                                     measure, progress);
    } else {
        // Each worker reads the outer splits through its own cursor (or from copies, for a
        // range without cursors); outcomes land by split index, so the order is the serial one.
        std::vector<owned_split> copies;
        constexpr bool cursors = requires { outer.cursor(); };
        if constexpr (!cursors) {
            copies.reserve(J);
            for (std::size_t i = 0; i < J; ++i)
                copies.emplace_back(outer.split(i));
        }
        std::vector<std::exception_ptr> errors(J);
        std::atomic<std::size_t> next{0};
        std::atomic<bool> failed{false};
        auto work = [&] {
            auto run = [&](auto&& split_at) {
                for (std::size_t i = next++; i < J && !failed; i = next++) {
                    try {
                        outcomes[i] = detail::run_outer_split<R>(split_at(i), inner_plan, stp, candidates, y,
                                                                 fit_predict, measure, progress);
                    } catch (...) {
                        errors[i] = std::current_exception();
                        failed = true;
                    }
                }
            };
            if constexpr (cursors) {
                auto c = outer.cursor();
                run([&](std::size_t i) -> const split& { return c.split(i); });
            } else {
                run([&](std::size_t i) { return copies[i].view(); });
            }
        };
        std::vector<std::thread> pool;
        pool.reserve(workers);
        for (std::size_t w = 0; w < workers; ++w)
            pool.emplace_back(work);
        for (auto& t : pool)
            t.join();
        // Every split before a failed one was started, so the earliest failure is known.
        for (std::size_t i = 0; i < J; ++i)
            if (errors[i])
                std::rethrow_exception(errors[i]);
    }

    // Record the outer predictions in split order; make the estimate of the procedure.
    res.recorded = aggregator(measure);
    res.candidates = candidates;
    res.better = M::better;
    res.selection_counts.assign(candidates, 0);
    res.inner_values.reserve(J * candidates);
    std::vector<E> test_truth;
    double inner_sum = 0;
    std::string undefined_reason;
    for (std::size_t i = 0; i < J; ++i) {
        auto& oc = outcomes[i];
        const split& o = outer.split(i);
        test_truth.resize(o.test.size());
        for (std::size_t k = 0; k < o.test.size(); ++k)
            test_truth[k] = y[o.test[k]];
        res.recorded.record(o, test_truth, *oc.predictions);
        oc.predictions.reset();
        res.chosen.push_back(oc.chosen);
        ++res.selection_counts[oc.chosen];
        inner_sum += *oc.inner[oc.chosen];
        res.inner_values.insert(res.inner_values.end(), oc.inner.begin(), oc.inner.end());
        res.ties += oc.tie ? 1 : 0;
        res.undefined_inner += oc.undefined;
        res.fits += oc.fits;
        if (undefined_reason.empty())
            undefined_reason = oc.undefined_reason;
    }
    try {
        res.outer = res.recorded.estimate(measure, options.method, options.level);
    } catch (const undefined_error& e) {
        // The interval is undefined (all outer values equal, say) while the value is not:
        // keep the fits' result, with the value alone and the reason, rather than lose it.
        res.outer = detail::point_only(res.recorded, measure, options, e);
    }
    res.inner_best = inner_sum / static_cast<double>(J);
    // How much better the inner choice looked than the outer estimate (badness: lower is better).
    res.optimism = measure_traits<M>::badness(res.outer.value) - measure_traits<M>::badness(res.inner_best);

    res.notes.push_back("nested evaluation: each of the " + std::to_string(J) + " outer splits chose among " +
                        std::to_string(candidates) + " candidates by " + std::string(detail::plan_name<InnerPlan>()) +
                        " inside its training set, then refitted the chosen one; the estimate covers the whole "
                        "selection procedure");
    if (res.ties > 0)
        res.notes.push_back("in " + std::to_string(res.ties) + " of " + std::to_string(J) +
                            " outer splits the best inner value was shared; the lowest candidate index was chosen");
    if (res.undefined_inner > 0)
        res.notes.push_back(std::to_string(res.undefined_inner) + " (candidate, inner split) values undefined (" +
                            undefined_reason + ") and left out of the inner means");
    return res;
}

HELDOUT_NAMESPACE_END
