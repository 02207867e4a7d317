// examples/tool/measures.hpp — the measures of the `heldout` tool by name, per task, and how
// each is estimated and compared (always through the library: the aggregator's ci::automatic
// and paired::automatic, or the family's own one-test-set functions).
//
//   auto table = heldout_tool::measures_of(heldout_tool::task::query);   // every name of a task
//   auto e = heldout_tool::parse_measure(heldout_tool::task::query, "ndcg@5", threshold);
//   e.add(aggregator);  e.estimate(aggregator, 0.95);  e.compare(agg_a, agg_b, 0.95);
//
// Names are the tool's own, lower case: a word, optionally "@" and a parameter (a cutoff k
// for the query measures, a time for the censored ones).
#pragma once

#include "csv.hpp"

#include <heldout/heldout.hpp>

#include <charconv>
#include <cmath>
#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace heldout_tool {

enum class task { regression, binary, multiclass, query, censored };

inline std::string_view task_name(task t) {
    switch (t) {
    case task::regression:
        return "regression";
    case task::binary:
        return "binary";
    case task::multiclass:
        return "multiclass";
    case task::query:
        return "query";
    case task::censored:
        return "censored";
    }
    return "?";
}

/// What the aggregator of a measure records as predictions.
enum class channel {
    main,  ///< the model's own column(s): values, scores, labels or class-probability rows
    labels ///< multiclass with class probabilities: the most probable class (lowest on ties)
};

/// The one-test-set data a family's own functions read (query ids, relevance, times, events).
struct one_set {
    std::span<const double> truth;       ///< binary 0/1, values, labels, relevance, or times
    std::span<const std::uint8_t> event; ///< censored
    std::span<const std::int64_t> query; ///< query
    std::span<const double> prediction;  ///< one model's scores
};

struct measure_entry {
    std::string key;  ///< the tool's name, as typed ("ndcg@10")
    std::string name; ///< the library's name() ("NDCG@10")
    heldout::direction better = heldout::direction::higher_is_better;
    channel ch = channel::main;
    bool probability_only = false; ///< binary: needs probabilities in [0, 1]
    bool class_rows_only = false;  ///< multiclass: needs class-probability columns
    bool unit_bounded = false;     ///< values lie in [0, 1]: a t-family interval is clipped to it
    std::function<void(heldout::aggregator&)> add;
    std::function<heldout::estimate(const heldout::aggregator&, double)> estimate;
    std::function<heldout::comparison(const heldout::aggregator&, const heldout::aggregator&, double)> compare;
    /// Query measures on one test set: the per-query values (the queries are the units).
    std::function<heldout::query_result(const one_set&)> queries;
    /// Censored C-indices on one test set: the infinitesimal-jackknife estimate and comparison.
    std::function<heldout::estimate(const one_set&, double)> one_set_estimate;
    std::function<heldout::comparison(const one_set&, std::span<const double>, double)> one_set_compare;
};

template <class M>
measure_entry entry_of(std::string key, const M& m, channel ch = channel::main) {
    measure_entry e;
    e.key = std::move(key);
    e.name = m.name();
    e.better = M::better;
    e.ch = ch;
    e.add = [m](heldout::aggregator& a) {
        if (!a.tracks(m))
            a.add_measure(m);
    };
    e.estimate = [m](const heldout::aggregator& a, double level) {
        return a.estimate(m, heldout::ci::automatic, level);
    };
    e.compare = [m](const heldout::aggregator& a, const heldout::aggregator& b, double level) {
        return heldout::compare(a, b, m, heldout::paired::automatic, level);
    };
    return e;
}

template <class M>
measure_entry query_entry(std::string key, const M& m) {
    measure_entry e = entry_of(std::move(key), m);
    e.unit_bounded = true; // NDCG, P@k, R@k, RR and AP@k lie in [0, 1] (DCG does not: not offered)
    e.queries = [m](const one_set& d) { return heldout::evaluate_queries(m, d.query, d.truth, d.prediction); };
    return e;
}

template <class M>
measure_entry concordance_entry(std::string key, const M& m) {
    measure_entry e = entry_of(std::move(key), m);
    e.unit_bounded = true;
    e.one_set_estimate = [m](const one_set& d, double level) {
        return heldout::concordance_estimate(m, heldout::censored(d.truth, d.event), d.prediction, level);
    };
    e.one_set_compare = [m](const one_set& d, std::span<const double> other, double level) {
        return heldout::compare_concordance(m, heldout::censored(d.truth, d.event), d.prediction, other, level);
    };
    return e;
}

/// A name the tool does not know, or a bad parameter: the message lists what it knows.
struct measure_name_error : std::runtime_error {
    using std::runtime_error::runtime_error;
};

/// One line of `--list-measures`: name, what it is, default or not.
struct measure_help {
    std::string_view name, what;
    bool default_ = false;
};

/// The names of a task, with what they are; defaults first.
inline std::vector<measure_help> measures_of(task t) {
    switch (t) {
    case task::regression:
        return {{"mse", "mean squared error", true},
                {"mae", "mean absolute error", true},
                {"r2", "R-squared (1 - SSE/SST on the test rows)", true},
                {"rmse", "root mean squared error", false},
                {"median-ae", "median absolute error", false},
                {"max-ae", "maximum absolute error", false}};
    case task::binary:
        return {{"error", "classification error at --threshold", true},
                {"brier", "Brier score, mean (p - y)^2 (probabilities)", true},
                {"log-loss", "cross-entropy, mean -log p(true class) (probabilities)", true},
                {"auc", "ROC AUC (Mann-Whitney form)", true},
                {"accuracy", "accuracy at --threshold", false},
                {"ap", "average precision (area under the precision-recall steps)", false},
                {"calibration", "calibration error (binned; probabilities)", false},
                {"mcc", "Matthews correlation at --threshold", false},
                {"balanced-accuracy", "balanced accuracy at --threshold", false}};
    case task::multiclass:
        return {{"error", "classification error (labels, or the most probable class)", true},
                {"log-loss", "multiclass cross-entropy (class-probability columns)", true},
                {"brier", "multiclass Brier score (class-probability columns)", true},
                {"auc", "multiclass AUC (class-probability columns)", false},
                {"accuracy", "accuracy", false},
                {"kappa", "Cohen's kappa", false},
                {"balanced-accuracy", "balanced accuracy", false}};
    case task::query:
        return {{"ndcg@10", "NDCG at cutoff k (exponential gain; @0: the whole list)", true},
                {"mrr", "reciprocal rank of the first relevant item (mean: MRR)", true},
                {"p@10", "precision at k (relevant: relevance > 0)", true},
                {"r@K", "recall at k", false},
                {"ap@K", "average precision at k (@0: the whole list)", false}};
    case task::censored:
        return {{"harrell-c", "Harrell's concordance of the risk score", true},
                {"uno-c", "Uno's concordance (IPCW); uno-c@T up to the horizon T", false},
                {"auc@T", "cumulative/dynamic AUC at time T (IPCW)", false}};
    }
    return {};
}

namespace detail {
inline std::optional<double> parameter_number(std::string_view s) {
    double x = 0;
    const auto r = double_from_chars(s.data(), s.data() + s.size(), x); // csv.hpp: libc++ 14 has no double from_chars
    if (r.ec != std::errc{} || r.ptr != s.data() + s.size() || !std::isfinite(x))
        return std::nullopt;
    return x;
}
} // namespace detail

/// The entry for a name of task t; measure_name_error when the name or its parameter is bad.
inline measure_entry parse_measure(task t, const std::string& text, double threshold) {
    namespace m = heldout::measure;
    const auto at = text.find('@');
    const std::string word = text.substr(0, at);
    const std::optional<std::string> param =
        at == std::string::npos ? std::nullopt : std::optional(text.substr(at + 1));
    auto unknown = [&]() -> measure_name_error {
        std::string known;
        for (const auto& h : measures_of(t))
            known += (known.empty() ? "" : ", ") + std::string(h.name);
        return measure_name_error("--measure: '" + text + "' is not a measure of the " + std::string(task_name(t)) +
                                  " task (it has " + known + "; --list-measures says what each is)");
    };
    auto no_param = [&] {
        if (param)
            throw measure_name_error("--measure: '" + word + "' takes no parameter (got '@" + *param + "')");
    };
    auto cutoff = [&]() -> std::size_t {
        if (!param)
            throw measure_name_error("--measure: '" + word + "' needs a cutoff: " + word + "@K, e.g. " + word + "@10");
        const auto x = detail::parameter_number(*param);
        if (!x || *x < 0 || *x != std::floor(*x) || *x > 1e9)
            throw measure_name_error("--measure: '" + text + "': the cutoff must be a whole number >= 0");
        return static_cast<std::size_t>(*x);
    };
    auto time = [&](bool required) -> std::optional<double> {
        if (!param) {
            if (required)
                throw measure_name_error("--measure: '" + word + "' needs a time: " + word + "@T, e.g. " + word + "@5");
            return std::nullopt;
        }
        const auto x = detail::parameter_number(*param);
        if (!x || *x < 0)
            throw measure_name_error("--measure: '" + text + "': the time must be a finite number >= 0");
        return x;
    };
    const auto error_at = heldout::at_threshold(m::classification_error{}, threshold);
    switch (t) {
    case task::regression:
        no_param();
        if (word == "mse")
            return entry_of(text, m::mse{});
        if (word == "mae")
            return entry_of(text, m::mae{});
        if (word == "r2")
            return entry_of(text, m::r_squared{});
        if (word == "rmse")
            return entry_of(text, m::rmse{});
        if (word == "median-ae")
            return entry_of(text, m::median_absolute_error{});
        if (word == "max-ae")
            return entry_of(text, m::max_absolute_error{});
        throw unknown();
    case task::binary: {
        no_param();
        measure_entry e;
        if (word == "error")
            e = entry_of(text, error_at);
        else if (word == "accuracy")
            e = entry_of(text, heldout::at_threshold(m::accuracy{}, threshold));
        else if (word == "mcc")
            e = entry_of(text, heldout::at_threshold(m::mcc{}, threshold));
        else if (word == "balanced-accuracy")
            e = entry_of(text, heldout::at_threshold(m::balanced_accuracy{}, threshold));
        else if (word == "brier")
            e = entry_of(text, m::brier_score{});
        else if (word == "log-loss")
            e = entry_of(text, m::cross_entropy{});
        else if (word == "calibration")
            e = entry_of(text, m::calibration_error{});
        else if (word == "auc")
            e = entry_of(text, m::auc{});
        else if (word == "ap")
            e = entry_of(text, m::average_precision{});
        else
            throw unknown();
        // Thresholds and probabilities: a raw score (outside [0, 1]) is ranked only.
        e.probability_only = word != "auc" && word != "ap";
        e.unit_bounded = word != "log-loss" && word != "mcc";
        return e;
    }
    case task::multiclass: {
        no_param();
        measure_entry e;
        if (word == "error")
            e = entry_of(text, m::classification_error{}, channel::labels);
        else if (word == "accuracy")
            e = entry_of(text, m::accuracy{}, channel::labels);
        else if (word == "kappa")
            e = entry_of(text, m::cohen_kappa{}, channel::labels);
        else if (word == "balanced-accuracy")
            e = entry_of(text, m::balanced_accuracy{}, channel::labels);
        else if (word == "log-loss")
            e = entry_of(text, m::multiclass_cross_entropy{});
        else if (word == "brier")
            e = entry_of(text, m::multiclass_brier_score{});
        else if (word == "auc")
            e = entry_of(text, m::multiclass_auc{});
        else
            throw unknown();
        e.class_rows_only = e.ch == channel::main;
        e.unit_bounded = word == "error" || word == "accuracy" || word == "balanced-accuracy" || word == "auc";
        return e;
    }
    case task::query:
        if (word == "ndcg")
            return query_entry(text, m::ndcg{.k = cutoff()});
        if (word == "p")
            return query_entry(text, m::precision_at{.k = cutoff()});
        if (word == "r")
            return query_entry(text, m::recall_at{.k = cutoff()});
        if (word == "ap")
            return query_entry(text, m::average_precision_at{.k = cutoff()});
        if (word == "mrr") {
            no_param();
            return query_entry(text, m::reciprocal_rank{});
        }
        throw unknown();
    case task::censored:
        if (word == "harrell-c") {
            no_param();
            return concordance_entry(text, m::harrell_c{});
        }
        if (word == "uno-c") {
            const auto h = time(false);
            return concordance_entry(text, h ? m::uno_c{.horizon = *h} : m::uno_c{});
        }
        if (word == "auc") {
            measure_entry e = entry_of(text, m::auc_at{.time = *time(true)});
            e.unit_bounded = true;
            return e;
        }
        throw unknown();
    }
    throw unknown();
}

/// The default names of a task.
inline std::vector<std::string> default_measures(task t) {
    std::vector<std::string> v;
    for (const auto& h : measures_of(t))
        if (h.default_)
            v.emplace_back(h.name);
    return v;
}

} // namespace heldout_tool
