// heldout — the prediction-file tool: estimates with intervals and pairwise comparisons of
// models from a CSV file of their predictions, for every task the library scores (see
// docs/tool.md).
//
//   heldout FILE [--task regression|binary|multiclass|query|censored] --score COL [--score COL ...]
//                [--truth COL] [--query COL] [--time COL --event COL] [--model COL]
//                [--split COL (--folds K | --train-size N)] [--measure NAME ...] [--threshold T]
//                [--level L] [--json] [--plots DIR] [--report FILE.html] [--list-measures]
//
// Every number comes from the library: each model's predictions are recorded in a
// heldout::aggregator (one split for one test set, one per value of --split), estimates are
// aggregator::estimate(m, ci::automatic) and comparisons heldout::compare(a, b, m,
// paired::automatic), so the tool and the library share one set of defaults (the rule table
// of estimate/methods.hpp). On one test set the query measures use evaluate_queries /
// estimate_queries / compare_queries (the queries are the units) and the censored C-indices
// concordance_estimate / compare_concordance. Every pair of models is compared, and the
// p-values of each measure are Holm-adjusted over its pairs.
#include "csv.hpp"
#include "measures.hpp"

#include <heldout/detail/json.hpp> // json_quote: the library's JSON string escaping
#include <heldout/heldout.hpp>

#include <CLI/CLI.hpp>

#include <unistd.h> // isatty: the progress line only on a terminal

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <iostream>
#include <map>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

namespace {

using heldout_tool::channel;
using heldout_tool::measure_entry;
using heldout_tool::task;

// Exit codes (documented in --help and docs/tool.md).
constexpr int exit_ok = 0;
constexpr int exit_data = 1;     // the file's content: CSV syntax, missing column, bad cell, a class absent
constexpr int exit_usage = 2;    // the command line
constexpr int exit_io = 3;       // a file (or standard input/output) that cannot be read or written
constexpr int exit_internal = 4; // anything else: a bug (or no memory), never a result

struct usage_error : std::runtime_error {
    using std::runtime_error::runtime_error;
};
struct data_error : std::runtime_error {
    using std::runtime_error::runtime_error;
};
using heldout_tool::io_error;

struct options {
    std::string file;
    task kind = task::binary;
    std::string truth;
    std::vector<std::string> scores;
    std::string model;
    std::string split;
    std::string query;
    std::string time;
    std::string event;
    std::vector<std::string> measures;
    std::size_t folds = 0;
    double train_size = 0;
    double threshold = 0.5;
    double level = 0.95;
    bool json = false;
    bool list = false;
    std::string plots;
    std::string report;
};

/// One model's predictions, one row per case: a value per row, or `cols` class probabilities.
struct model_data {
    std::string name;
    std::vector<double> values; // row-major, cols per row
    std::size_t cols = 1;
    bool probability = true;          // binary: every score in [0, 1]
    std::vector<std::int64_t> labels; // multiclass: the given or most probable class of each row
};

struct dataset {
    std::vector<double> truth;       // 0/1, values, labels, relevance, or times (censored)
    std::vector<std::uint8_t> event; // censored
    std::vector<std::int64_t> query; // query
    std::vector<model_data> models;
    std::vector<std::size_t> split;       // split number of each row (0 without --split)
    std::vector<std::string> split_names; // in order of first appearance
    std::size_t positives = 0, negatives = 0, events = 0, classes = 0, queries = 0;
};

std::string ordinal_row(std::size_t k) { return std::to_string(k + 1); }

// ---- progress -----------------------------------------------------------------------

/// "heldout: 12/40 AUC, knn vs logistic" on standard error, rewritten in place, when it is a
/// terminal; nothing at all when it is not (a pipe, a file, a test).
class progress {
public:
    explicit progress(std::size_t total) : on_(isatty(STDERR_FILENO) == 1), total_(total) {}
    progress(const progress&) = delete;
    progress& operator=(const progress&) = delete;
    ~progress() { done(); }
    void step(const std::string& what) {
        ++count_;
        if (!on_)
            return;
        std::string line = "heldout: " + std::to_string(count_) + "/" + std::to_string(total_) + " " + what;
        if (line.size() > 78)
            line = line.substr(0, 75) + "...";
        std::fprintf(stderr, "\r%-78s", line.c_str());
        std::fflush(stderr);
        shown_ = true;
    }
    void done() {
        if (shown_)
            std::fprintf(stderr, "\r%78s\r", "");
        shown_ = false;
    }

private:
    bool on_;
    std::size_t total_, count_ = 0;
    bool shown_ = false;
};

// ---- reading --------------------------------------------------------------------------

constexpr std::size_t none = static_cast<std::size_t>(-1);

/// The prediction columns of one --score NAME: NAME itself, or, for multiclass, the class
/// probability columns NAME:0, NAME:1, ... (as the library's out-of-fold writer names them).
std::vector<std::size_t> prediction_columns(const heldout_tool::csv_table& t, const std::string& name, task k) {
    for (std::size_t c = 0; c < t.columns(); ++c)
        if (t.header()[c] == name)
            return {c};
    if (k == task::multiclass) {
        std::vector<std::size_t> cols;
        for (;;) {
            const std::string want = name + ":" + std::to_string(cols.size());
            std::size_t found = none;
            for (std::size_t c = 0; c < t.columns(); ++c)
                if (t.header()[c] == want)
                    found = c;
            if (found == none)
                break;
            cols.push_back(found);
        }
        if (cols.size() >= 2)
            return cols;
        t.column(name); // throws, listing the columns
    }
    return {t.column(name)};
}

dataset read(const heldout_tool::csv_table& t, const options& o) {
    dataset d;
    if (t.rows() == 0)
        throw data_error("the file has a header but no data rows");
    const task k = o.kind;
    const std::size_t yc = k == task::censored ? none : t.column(o.truth);
    const std::size_t time_col = k == task::censored ? t.column(o.time) : none;
    const std::size_t event_col = k == task::censored ? t.column(o.event) : none;
    const std::size_t query_col = k == task::query ? t.column(o.query) : none;
    const std::size_t model_col = o.model.empty() ? none : t.column(o.model);
    const std::size_t split_col = o.split.empty() ? none : t.column(o.split);
    std::vector<std::vector<std::size_t>> score_cols;
    for (const auto& s : o.scores)
        score_cols.push_back(prediction_columns(t, s, k));

    auto whole = [&](std::size_t r, std::size_t c, const char* what) {
        const double v = t.number(r, c);
        if (v != std::floor(v) || std::abs(v) > 9e15)
            throw data_error(t.where(r, c) + ": " + what + " must be a whole number, got '" +
                             heldout_tool::csv_table::printable(t.cell(r, c)) + "'");
        return v;
    };
    // The case's own columns (truth, and time/event/query) of file row r.
    struct case_row {
        double truth = 0;
        std::uint8_t event = 0;
        std::int64_t query = 0;
        bool operator==(const case_row&) const = default;
    };
    auto case_at = [&](std::size_t r) {
        case_row c;
        switch (k) {
        case task::binary: {
            c.truth = t.number(r, yc);
            if (c.truth != 0 && c.truth != 1)
                throw data_error(t.where(r, yc) + ": truth must be 0 or 1, got '" +
                                 heldout_tool::csv_table::printable(t.cell(r, yc)) + "'");
            break;
        }
        case task::regression:
            c.truth = t.number(r, yc);
            break;
        case task::multiclass:
            c.truth = whole(r, yc, "a class");
            if (c.truth < 0)
                throw data_error(t.where(r, yc) + ": a class must be 0, 1, 2, ..., got '" +
                                 heldout_tool::csv_table::printable(t.cell(r, yc)) + "'");
            break;
        case task::query:
            c.truth = t.number(r, yc);
            if (c.truth < 0)
                throw data_error(t.where(r, yc) + ": relevance must be >= 0, got '" +
                                 heldout_tool::csv_table::printable(t.cell(r, yc)) + "'");
            c.query = static_cast<std::int64_t>(whole(r, query_col, "a query id"));
            break;
        case task::censored: {
            c.truth = t.number(r, time_col);
            if (c.truth < 0)
                throw data_error(t.where(r, time_col) + ": a time must be >= 0, got '" +
                                 heldout_tool::csv_table::printable(t.cell(r, time_col)) + "'");
            const double e = t.number(r, event_col);
            if (e != 0 && e != 1)
                throw data_error(t.where(r, event_col) + ": event must be 0 (censored) or 1, got '" +
                                 heldout_tool::csv_table::printable(t.cell(r, event_col)) + "'");
            c.event = static_cast<std::uint8_t>(e);
            break;
        }
        }
        return c;
    };
    auto push_case = [&](const case_row& c) {
        d.truth.push_back(c.truth);
        if (k == task::censored)
            d.event.push_back(c.event);
        if (k == task::query)
            d.query.push_back(c.query);
    };
    std::map<std::string, std::size_t> split_index;
    auto split_at = [&](std::size_t r) -> std::size_t {
        if (split_col == none)
            return 0;
        const std::string& s = t.cell(r, split_col);
        if (s.empty())
            throw data_error(t.where(r, split_col) + ": empty split name");
        auto [it, fresh] = split_index.emplace(s, d.split_names.size());
        if (fresh)
            d.split_names.push_back(s);
        return it->second;
    };
    auto read_prediction = [&](model_data& m, std::size_t r, const std::vector<std::size_t>& cols) {
        for (const std::size_t c : cols)
            m.values.push_back(t.number(r, c));
    };
    // The column the case columns' messages point at when paired rows disagree.
    const std::size_t case_col = k == task::censored ? time_col : yc;
    const char* case_what = k == task::censored ? "time or event" : k == task::query ? "truth or query" : "truth";

    if (model_col == none) { // wide layout: one score column (or set of class columns) per model
        for (std::size_t m = 0; m < score_cols.size(); ++m)
            d.models.push_back({o.scores[m], {}, score_cols[m].size(), true, {}});
        for (std::size_t r = 0; r < t.rows(); ++r) {
            push_case(case_at(r));
            d.split.push_back(split_at(r));
            for (std::size_t m = 0; m < score_cols.size(); ++m)
                read_prediction(d.models[m], r, score_cols[m]);
        }
    } else { // long layout: rows of each model in order; the i-th rows of all models are paired
        std::map<std::string, std::size_t> model_index;
        std::vector<std::vector<std::size_t>> rows_of;
        for (std::size_t r = 0; r < t.rows(); ++r) {
            const std::string& name = t.cell(r, model_col);
            if (name.empty())
                throw data_error(t.where(r, model_col) + ": empty model name");
            auto [it, fresh] = model_index.emplace(name, d.models.size());
            if (fresh) {
                d.models.push_back({name, {}, score_cols[0].size(), true, {}});
                rows_of.emplace_back();
            }
            rows_of[it->second].push_back(r);
        }
        for (std::size_t m = 1; m < d.models.size(); ++m)
            if (rows_of[m].size() != rows_of[0].size())
                throw data_error("column " + std::to_string(model_col + 1) + " ('" + o.model + "'): model '" +
                                 d.models[m].name + "' has " + std::to_string(rows_of[m].size()) + " rows, model '" +
                                 d.models[0].name + "' has " + std::to_string(rows_of[0].size()) +
                                 " (the long layout pairs the i-th rows of every model)");
        const std::size_t n = rows_of[0].size();
        for (std::size_t i = 0; i < n; ++i) {
            const std::size_t r0 = rows_of[0][i];
            const case_row c0 = case_at(r0);
            push_case(c0);
            d.split.push_back(split_at(r0));
            for (std::size_t m = 0; m < d.models.size(); ++m) {
                const std::size_t r = rows_of[m][i];
                if (m > 0 && !(case_at(r) == c0))
                    throw data_error(t.where(r, case_col) + ": " + case_what + " differs from line " +
                                     std::to_string(t.line_of(r0)) + ", its pair (row " + ordinal_row(i) +
                                     " of every model)");
                if (m > 0 && split_col != none && split_at(r) != d.split.back())
                    throw data_error(t.where(r, split_col) + ": split differs from line " +
                                     std::to_string(t.line_of(r0)) + ", its pair (row " + ordinal_row(i) +
                                     " of every model)");
                read_prediction(d.models[m], r, score_cols[0]);
            }
        }
    }
    if (d.split_names.empty())
        d.split_names.push_back("all");

    // What each task needs of the whole file.
    switch (k) {
    case task::binary:
        for (auto v : d.truth)
            (v == 1 ? d.positives : d.negatives) += 1;
        if (d.positives == 0 || d.negatives == 0)
            throw data_error("column " + std::to_string(yc + 1) + " ('" + o.truth + "'): class " +
                             (d.positives == 0 ? "1" : "0") + " never occurs; both classes are needed");
        for (auto& m : d.models)
            m.probability = std::all_of(m.values.begin(), m.values.end(), [](double s) { return s >= 0 && s <= 1; });
        break;
    case task::multiclass: {
        double top = 0;
        for (double v : d.truth)
            top = std::max(top, v);
        std::size_t classes = static_cast<std::size_t>(top) + 1;
        for (auto& m : d.models) {
            const std::size_t n = d.truth.size();
            m.labels.resize(n);
            if (m.cols == 1) { // labels
                m.probability = false;
                for (std::size_t i = 0; i < n; ++i) {
                    const double v = m.values[i];
                    if (v < 0 || v != std::floor(v) || v > 9e15)
                        throw data_error("model '" + m.name + "', row " + ordinal_row(i) +
                                         ": a predicted class must be 0, 1, 2, ..., got " + heldout::report::number(v));
                    m.labels[i] = static_cast<std::int64_t>(v);
                    classes = std::max(classes, static_cast<std::size_t>(v) + 1);
                }
            } else { // class probabilities: the most probable class (the lowest on a tie)
                for (std::size_t i = 0; i < n; ++i) {
                    const double* p = m.values.data() + i * m.cols;
                    m.labels[i] = static_cast<std::int64_t>(std::max_element(p, p + m.cols) - p);
                }
            }
        }
        for (const auto& m : d.models)
            if (m.cols > 1 && m.cols < classes)
                throw data_error("model '" + m.name + "': " + std::to_string(m.cols) +
                                 " class-probability columns, but class " + std::to_string(classes - 1) +
                                 " occurs (classes are 0, 1, ..., one column NAME:j each)");
        d.classes = classes;
        for (const auto& m : d.models)
            d.classes = std::max(d.classes, m.cols > 1 ? m.cols : 0);
        break;
    }
    case task::censored:
        for (auto e : d.event)
            d.events += e;
        if (d.events == 0)
            throw data_error("column " + std::to_string(event_col + 1) + " ('" + o.event +
                             "'): no event (every row censored); a concordance needs events");
        break;
    case task::query: {
        std::vector<std::int64_t> q = d.query;
        std::sort(q.begin(), q.end());
        d.queries = static_cast<std::size_t>(std::unique(q.begin(), q.end()) - q.begin());
        break;
    }
    case task::regression:
        break;
    }
    return d;
}

// ---- computing ------------------------------------------------------------------------

/// One estimate of the report: the library's, with the tool's key and clipping flag.
struct estimate_row {
    std::string key;
    heldout::estimate e;
    bool clipped = false;
};
struct comparison_row {
    std::string key;
    heldout::comparison c;
};

struct report {
    std::vector<measure_entry> measures;
    std::vector<estimate_row> estimates;
    std::vector<comparison_row> comparisons;
    std::vector<std::string> notes;
    bool resampled = false;
};

/// A t-family interval (mean +- t se) of a measure bounded in [0, 1] can reach outside it;
/// values there are impossible, so the interval is cut to [0, 1], and a note says so (with
/// the uncut interval). Score intervals (Wilson, DeLong on the logit scale, Newcombe) stay
/// inside by construction.
void clip_to_unit(estimate_row& r, report& rep) {
    auto& e = r.e;
    if (!e.lower || !e.upper || (*e.lower >= 0 && *e.upper <= 1))
        return;
    const double lo = *e.lower, hi = *e.upper;
    e.lower = std::max(0.0, lo);
    e.upper = std::min(1.0, hi);
    r.clipped = true;
    rep.notes.push_back(e.model + ", " + e.measure + ": the " + e.method_label + " interval [" +
                        heldout::report::number(lo, 4) + ", " + heldout::report::number(hi, 4) +
                        "] reaches outside [0, 1], where the measure lies; clipped to [" +
                        heldout::report::number(*e.lower, 4) + ", " + heldout::report::number(*e.upper, 4) + "]");
}

template <class T>
std::vector<T> gather(const std::vector<T>& v, const std::vector<std::size_t>& rows, std::size_t cols = 1) {
    std::vector<T> out;
    out.reserve(rows.size() * cols);
    for (const std::size_t r : rows)
        for (std::size_t j = 0; j < cols; ++j)
            out.push_back(v[r * cols + j]);
    return out;
}

/// Records one model's predictions, split by split, into an aggregator of channel ch.
void record(heldout::aggregator& agg, const dataset& d, const model_data& m, channel ch, task k,
            const std::vector<std::vector<std::size_t>>& rows, const std::vector<std::size_t>& train_sizes) {
    std::vector<std::size_t> train;
    for (std::size_t s = 0; s < rows.size(); ++s) {
        // Only the number of training rows matters to the methods (n_train of the corrected t).
        train.resize(train_sizes[s]);
        for (std::size_t i = 0; i < train.size(); ++i)
            train[i] = i;
        const heldout::split sp{train, rows[s], 0, s, s, {}, heldout::split_design::random};
        switch (k) {
        case task::regression:
            agg.record(sp, gather(d.truth, rows[s]), gather(m.values, rows[s]));
            break;
        case task::binary: {
            std::vector<std::uint8_t> y;
            for (const std::size_t r : rows[s])
                y.push_back(static_cast<std::uint8_t>(d.truth[r]));
            agg.record(sp, y, gather(m.values, rows[s]));
            break;
        }
        case task::multiclass: {
            std::vector<std::int64_t> y;
            for (const std::size_t r : rows[s])
                y.push_back(static_cast<std::int64_t>(d.truth[r]));
            if (ch == channel::labels || m.cols == 1)
                agg.record(sp, y, gather(m.labels, rows[s]));
            else {
                const auto p = gather(m.values, rows[s], m.cols);
                agg.record(sp, y, heldout::rows(p, m.cols));
            }
            break;
        }
        case task::query: {
            const auto q = gather(d.query, rows[s]);
            const auto rel = gather(d.truth, rows[s]);
            agg.record(sp, heldout::by_query(q, rel), gather(m.values, rows[s]));
            break;
        }
        case task::censored: {
            const auto time = gather(d.truth, rows[s]);
            const auto event = gather(d.event, rows[s]);
            agg.record(sp, heldout::censored(time, event), gather(m.values, rows[s]));
            break;
        }
        }
    }
}

/// Why model m cannot be scored by measure e (binary: raw scores by a measure of
/// probabilities; multiclass: labels by a measure of class probabilities; log loss of a model
/// that gives the true class probability 0), or nothing when it can.
std::optional<std::string> why_not(const measure_entry& e, const dataset& d, const model_data& m) {
    if (e.probability_only && !m.probability)
        return std::string("its scores leave [0, 1]: they are ranked only, by AUC and AP");
    if (e.class_rows_only && m.cols == 1)
        return std::string("it gives class labels; the measure needs class-probability columns NAME:0, NAME:1, ...");
    if (e.key == "log-loss")
        for (std::size_t i = 0; i < d.truth.size(); ++i) {
            const double p = m.cols == 1 ? (d.truth[i] == 1 ? m.values[i] : 1 - m.values[i])
                                         : m.values[i * m.cols + static_cast<std::size_t>(d.truth[i])];
            if (p == 0)
                return "row " + ordinal_row(i) + " gives its true class probability 0: an infinite log loss";
        }
    return std::nullopt;
}

heldout_tool::one_set one_set_of(const dataset& d, const model_data& m) {
    return {d.truth, d.event, d.query, m.values};
}

report evaluate_all(const dataset& d, const options& o, std::vector<measure_entry> measures) {
    report rep;
    rep.measures = std::move(measures);
    const std::size_t k = d.split_names.size();
    rep.resampled = !o.split.empty();
    if (rep.resampled && k < 2)
        throw data_error("column '" + o.split + "' names one split only; resampled estimates need at least two");
    std::vector<std::vector<std::size_t>> rows(k);
    for (std::size_t r = 0; r < d.truth.size(); ++r)
        rows[d.split[r]].push_back(r);
    std::vector<std::size_t> train_sizes(k, 0);
    for (std::size_t s = 0; s < k && rep.resampled; ++s)
        train_sizes[s] = o.train_size > 0 ? static_cast<std::size_t>(o.train_size) : (o.folds - 1) * rows[s].size();

    const std::size_t nm = d.models.size();
    std::size_t steps = nm + nm * rep.measures.size() + rep.measures.size() * nm * (nm - 1) / 2;
    progress bar(steps);

    // One aggregator per model and channel, each tracking the measures of its channel.
    const bool one_set_only = !rep.resampled;
    std::vector<std::vector<bool>> scored(nm); // scored[m][j]: model m has measure j
    for (std::size_t m = 0; m < nm; ++m)
        for (const auto& e : rep.measures) {
            const auto why = why_not(e, d, d.models[m]);
            scored[m].push_back(!why);
            if (why)
                rep.notes.push_back(d.models[m].name + ": no " + e.name + " (" + *why + ")");
        }
    std::vector<std::map<channel, heldout::aggregator>> aggs(nm);
    for (std::size_t m = 0; m < nm; ++m) {
        bar.step("recording " + d.models[m].name);
        for (std::size_t j = 0; j < rep.measures.size(); ++j) {
            const auto& e = rep.measures[j];
            if (!scored[m][j])
                continue;
            // one test set: the query and C-index measures have functions of their own
            if (one_set_only && (e.queries || e.one_set_estimate))
                continue;
            auto [it, fresh] = aggs[m].try_emplace(e.ch);
            if (fresh)
                it->second.set_model(d.models[m].name);
            e.add(it->second);
        }
        for (auto& [ch, agg] : aggs[m])
            record(agg, d, d.models[m], ch, o.kind, rows, train_sizes);
    }

    auto unit_note = [&](const measure_entry& e, const std::string& who, const std::string& what) {
        rep.notes.push_back(who + ", " + e.name + ": " + what);
    };
    for (std::size_t mi = 0; mi < rep.measures.size(); ++mi) {
        const auto& e = rep.measures[mi];
        std::vector<std::optional<heldout::query_result>> qr(nm);
        for (std::size_t m = 0; m < nm; ++m) {
            const auto& md = d.models[m];
            bar.step(e.name + ", " + md.name);
            if (!scored[m][mi])
                continue;
            try {
                estimate_row r{e.key, {}, false};
                if (one_set_only && e.queries) {
                    qr[m] = e.queries(one_set_of(d, md));
                    r.e = heldout::estimate_queries(*qr[m], o.level);
                    r.e.model = md.name;
                } else if (one_set_only && e.one_set_estimate) {
                    r.e = e.one_set_estimate(one_set_of(d, md), o.level);
                    r.e.model = md.name;
                } else {
                    r.e = e.estimate(aggs[m].at(e.ch), o.level);
                }
                rep.estimates.push_back(std::move(r));
                if (e.unit_bounded)
                    clip_to_unit(rep.estimates.back(), rep);
            } catch (const heldout::input_error& err) { // undefined, or no method applies (the reason)
                unit_note(e, md.name, std::string("no estimate: ") + err.what());
            }
        }
        // every pair of models scored by this measure; Holm over the pairs of the measure
        std::vector<comparison_row> pairs;
        for (std::size_t i = 0; i < nm; ++i)
            for (std::size_t j = i + 1; j < nm; ++j) {
                const auto &a = d.models[i], &b = d.models[j];
                bar.step(e.name + ", " + a.name + " vs " + b.name);
                if (!scored[i][mi] || !scored[j][mi])
                    continue;
                try {
                    heldout::comparison c;
                    if (one_set_only && e.queries) {
                        if (!qr[i] || !qr[j])
                            continue;
                        c = heldout::compare_queries(*qr[i], *qr[j],
                                                     {.level = o.level, .model_a = a.name, .model_b = b.name});
                    } else if (one_set_only && e.one_set_compare) {
                        c = e.one_set_compare(one_set_of(d, a), b.values, o.level);
                        c.model_a = a.name;
                        c.model_b = b.name;
                    } else {
                        c = e.compare(aggs[i].at(e.ch), aggs[j].at(e.ch), o.level);
                    }
                    pairs.push_back({e.key, std::move(c)});
                } catch (const heldout::input_error& err) { // undefined, or no method applies
                    rep.notes.push_back(e.name + ", " + a.name + " vs " + b.name + ": no comparison: " + err.what());
                }
            }
        if (pairs.size() >= 2) {
            std::vector<double> p;
            for (const auto& c : pairs)
                p.push_back(c.c.p_value);
            const auto adj = heldout::holm_adjust(p);
            for (std::size_t i = 0; i < pairs.size(); ++i)
                pairs[i].c.adjusted_p_value = adj[i];
        }
        for (auto& c : pairs)
            rep.comparisons.push_back(std::move(c));
    }
    bar.done();
    if (rep.resampled) {
        double n_test = 0, n_train = 0;
        for (std::size_t s = 0; s < k; ++s) {
            n_test += static_cast<double>(rows[s].size());
            n_train += static_cast<double>(train_sizes[s]);
        }
        rep.notes.push_back(
            "corrected t: n_test = " + heldout::detail::note_number(n_test / static_cast<double>(k)) +
            " rows per split (mean), n_train = " + heldout::detail::note_number(n_train / static_cast<double>(k)) +
            (o.train_size > 0 ? " (--train-size)" : " ((K - 1) n_test of each split, --folds)"));
    }
    return rep;
}

// ---- plots and the HTML report ---------------------------------------------------------

std::vector<std::string> write_plots(const dataset& d, const options& o, const report& rep) {
    namespace fs = std::filesystem;
    std::vector<std::string> written;
    std::error_code ec;
    fs::create_directories(o.plots, ec);
    if (ec)
        throw io_error("cannot create the plot directory '" + o.plots + "': " + ec.message());
    auto save = [](const std::string& text, const std::string& path) {
        try {
            heldout::report::save(text, path);
        } catch (const std::runtime_error& e) { // cannot open or write: the file system's answer
            throw io_error(e.what());
        }
    };
    if (o.kind == task::binary) {
        std::vector<std::uint8_t> y(d.truth.begin(), d.truth.end());
        std::vector<heldout::report::roc_series> roc;
        for (const auto& m : d.models)
            roc.push_back(heldout::report::roc_series_of(
                m.name + " (AUC " +
                    heldout::report::number(heldout::evaluate(heldout::measure::auc{}, y, m.values), 3) + ")",
                heldout::roc_points(y, m.values)));
        save(heldout::report::roc_plot(roc, "ROC curves", o.split.empty() ? "" : "all splits pooled"),
             (fs::path(o.plots) / "roc.svg").string());
        written.push_back("roc.svg");
        std::vector<heldout::report::calibration_series> cal;
        for (const auto& m : d.models)
            if (m.probability)
                cal.push_back({m.name, heldout::report::reliability_bins(y, m.values, 10)});
        if (!cal.empty()) {
            save(heldout::report::calibration_plot(cal), (fs::path(o.plots) / "calibration.svg").string());
            written.push_back("calibration.svg");
        }
    }
    // per-split values as strip plots, one per measure; paired when every split is defined
    if (rep.resampled)
        for (const auto& me : rep.measures) {
            std::vector<heldout::report::strip_group> groups;
            bool complete = true;
            for (const auto& r : rep.estimates) {
                if (r.key != me.key)
                    continue;
                heldout::report::strip_group g{r.e.model, {}};
                for (const auto& s : r.e.per_split) {
                    complete = complete && s.value.has_value();
                    if (s.value)
                        g.values.push_back(*s.value);
                }
                if (!g.values.empty())
                    groups.push_back(std::move(g));
            }
            if (groups.empty())
                continue;
            std::string file = "folds_";
            for (const char c : me.key)
                file += std::isalnum(static_cast<unsigned char>(c)) ? c : '_';
            file += ".svg";
            save(heldout::report::strip_plot(groups, {.title = me.name + " per split",
                                                      .value_label = me.name,
                                                      .subtitle = "split column '" + o.split + "'",
                                                      .paired = complete}),
                 (fs::path(o.plots) / file).string());
            written.push_back(file);
        }
    return written;
}

std::string summary_line(const dataset& d, const options& o);

void write_report(const dataset& d, const options& o, const report& rep, const std::string& shown) {
    heldout::report::html_report page({.title = "Evaluation of " + std::to_string(d.models.size()) +
                                                (d.models.size() == 1 ? " model" : " models") + ": " +
                                                std::string(task_name(o.kind)) + " task",
                                       .subtitle = summary_line(d, o)});
    std::vector<std::pair<std::string, std::string>> facts{
        {"file", shown}, {"task", std::string(task_name(o.kind))}, {"rows", std::to_string(d.truth.size())}};
    std::string models;
    for (const auto& m : d.models)
        models += (models.empty() ? "" : ", ") + m.name;
    facts.emplace_back("models", models);
    facts.emplace_back("design", o.split.empty()
                                     ? "one test set"
                                     : std::to_string(d.split_names.size()) + " splits in column '" + o.split + "'");
    facts.emplace_back("intervals", heldout::report::number(o.level * 100) + "%, the library's defaults "
                                                                             "(ci::automatic, paired::automatic)");
    page.facts(facts);
    std::vector<heldout::estimate> es;
    for (const auto& r : rep.estimates)
        es.push_back(r.e);
    if (!es.empty())
        page.estimates(es);
    std::vector<heldout::comparison> cs;
    for (const auto& c : rep.comparisons)
        cs.push_back(c.c);
    if (!cs.empty())
        page.comparisons(cs);
    if (o.kind == task::binary) {
        std::vector<std::uint8_t> y(d.truth.begin(), d.truth.end());
        std::vector<std::string> names, pnames;
        std::vector<std::vector<double>> scores, probs;
        for (const auto& m : d.models) {
            names.push_back(m.name);
            scores.push_back(m.values);
            if (m.probability) {
                pnames.push_back(m.name);
                probs.push_back(m.values);
            }
        }
        page.curves(names, y, scores, o.split.empty() ? "" : "all splits pooled");
        if (!probs.empty())
            page.reliability(pnames, y, probs, 10, o.level);
    }
    if (o.kind == task::multiclass) {
        const std::vector<std::int64_t> y(d.truth.begin(), d.truth.end());
        std::vector<std::string> classes;
        for (std::size_t c = 0; c < d.classes; ++c)
            classes.push_back(std::to_string(c));
        bool first = true; // one section for every model's table
        for (const auto& m : d.models) {
            page.confusion(m.name, y, m.labels, classes, first ? "Confusion tables" : "");
            first = false;
        }
    }
    if (rep.resampled)
        for (const auto& me : rep.measures) {
            std::vector<heldout::estimate> per;
            for (const auto& r : rep.estimates)
                if (r.key == me.key)
                    per.push_back(r.e);
            if (per.empty())
                continue;
            page.per_split(per);
            if (per.size() >= 3)
                try {
                    page.ranks(per, me.better);
                } catch (const heldout::input_error& e) { // e.g. no split where all are defined
                    page.text(std::string("No critical-difference diagram for ") + me.name + ": " + e.what());
                }
        }
    if (!rep.notes.empty())
        page.notes(rep.notes);
    try {
        page.save(o.report);
    } catch (const heldout::input_error&) {
        throw;
    } catch (const std::runtime_error& e) { // cannot open or write
        throw io_error(e.what());
    }
}

// ---- output ---------------------------------------------------------------------------

std::string pad(std::string s, std::size_t w) {
    if (s.size() < w)
        s.append(w - s.size(), ' ');
    return s;
}

std::string summary_line(const dataset& d, const options& o) {
    std::string s = std::to_string(d.truth.size()) + " rows, " + std::to_string(d.models.size()) +
                    (d.models.size() == 1 ? " model" : " models") + ", " + std::string(task_name(o.kind)) + " task, ";
    switch (o.kind) {
    case task::binary:
        s += "truth '" + o.truth + "' (" + std::to_string(d.positives) + " of class 1, " + std::to_string(d.negatives) +
             " of class 0), ";
        break;
    case task::regression:
        s += "truth '" + o.truth + "', ";
        break;
    case task::multiclass:
        s += "truth '" + o.truth + "' (" + std::to_string(d.classes) + " classes), ";
        break;
    case task::query:
        s += "relevance '" + o.truth + "', " + std::to_string(d.queries) + " queries in '" + o.query + "', ";
        break;
    case task::censored:
        s += "time '" + o.time + "', event '" + o.event + "' (" + std::to_string(d.events) + " events), ";
        break;
    }
    if (o.split.empty())
        s += "one test set";
    else
        s += std::to_string(d.split_names.size()) + " splits in column '" + o.split + "'";
    return s;
}

/// The printed name of a method with its statistic: "t", "z", "b" (McNemar's discordant count).
std::string statistic_name(const heldout::comparison& c) {
    using id = heldout::paired::method_id;
    switch (c.method) {
    case id::mcnemar_exact:
    case id::mcnemar_mid_p:
        return "b";
    case id::mcnemar_chi_squared:
    case id::mcnemar_corrected:
        return "chi2";
    case id::five_by_two_f:
        return "F";
    case id::bootstrap_percentile:
    case id::bootstrap_bca:
        return "diff/se";
    case id::delong:
        return "z";
    case id::automatic:
        break;
    default:
        return c.df ? "t" : "z";
    }
    return c.df ? "t" : "z";
}

void print_text(const dataset& d, const std::string& shown, const options& o, const report& rep) {
    namespace num = heldout::report;
    std::cout << "heldout: " << shown << ": " << summary_line(d, o) << '\n';
    if (o.kind == task::binary)
        std::cout << "Decisions at threshold " << num::number(o.threshold) << "; ";
    std::cout << "intervals at " << num::number(o.level * 100) << "%.\n\nEstimates\n";
    std::size_t wm = 5, wq = 7;
    for (const auto& m : d.models)
        wm = std::max(wm, m.name.size());
    for (const auto& r : rep.estimates)
        wq = std::max(wq, r.e.measure.size());
    for (const auto& r : rep.comparisons)
        wq = std::max(wq, r.c.measure.size());
    std::cout << "  " << pad("model", wm) << "  " << pad("measure", wq) << "  " << pad("value", 8) << "  "
              << pad("interval", 18) << "  method\n";
    for (const auto& r : rep.estimates) {
        const auto& e = r.e;
        std::cout << "  " << pad(e.model, wm) << "  " << pad(e.measure, wq) << "  "
                  << pad(num::value_text(e.value, e.lower, e.upper), 8) << "  "
                  << pad(num::interval_text(e.lower, e.upper), 18) << "  " << e.method_label;
        if (rep.resampled)
            std::cout << ", " << e.splits << " splits";
        std::cout << '\n';
    }
    if (!rep.comparisons.empty()) {
        std::cout << "\nPairwise comparisons (difference = first - second; Holm over the pairs of each measure)\n";
        std::size_t wp = 4;
        for (const auto& c : rep.comparisons)
            wp = std::max(wp, c.c.model_a.size() + c.c.model_b.size() + 4);
        std::cout << "  " << pad("pair", wp) << "  " << pad("measure", wq) << "  " << pad("diff.", 8) << "  "
                  << pad("interval", 18) << "  " << pad("statistic", 16) << "  " << pad("p", 8) << "  "
                  << pad("Holm p", 8) << "  test\n";
        for (const auto& row : rep.comparisons) {
            const auto& c = row.c;
            std::cout << "  " << pad(c.model_a + " vs " + c.model_b, wp) << "  " << pad(c.measure, wq) << "  "
                      << pad(num::value_text(c.difference, c.lower, c.upper), 8) << "  "
                      << pad(num::interval_text(c.lower, c.upper), 18) << "  "
                      << pad(statistic_name(c) + " = " + num::number(c.statistic, 3), 16) << "  "
                      << pad(num::p_text(c.p_value), 8) << "  "
                      << pad(c.adjusted_p_value ? num::p_text(*c.adjusted_p_value) : "-", 8) << "  " << c.method_label
                      << '\n';
        }
    }
    std::vector<std::string> all = rep.notes;
    for (const auto& r : rep.estimates)
        for (const auto& c : r.e.cautions)
            all.push_back(r.e.model + ", " + r.e.measure + ": caution: " + c);
    for (const auto& r : rep.comparisons)
        for (const auto& c : r.c.cautions)
            all.push_back(r.c.measure + ", " + r.c.model_a + " vs " + r.c.model_b + ": caution: " + c);
    for (const auto& n : all)
        std::cout << "\nnote: " << n;
    if (!all.empty())
        std::cout << '\n';
}

/// A JSON string literal: control characters escaped, ill-formed UTF-8 replaced by U+FFFD
/// (the library's writer, heldout/detail/json.hpp), so names of any bytes give valid JSON.
std::string json_string(std::string_view s) {
    std::string out;
    heldout::detail::json_quote(out, s);
    return out;
}
// Full round-trip precision: the shortest text that reads back as the same double.
std::string json_number(double x) { return std::isfinite(x) ? heldout::report::number(x) : std::string("null"); }
std::string json_number(const std::optional<double>& x) { return x ? json_number(*x) : "null"; }
std::string json_strings(const std::vector<std::string>& v) {
    std::string s = "[";
    for (std::size_t i = 0; i < v.size(); ++i)
        s += (i ? ", " : "") + json_string(v[i]);
    return s + "]";
}

void print_json(const dataset& d, const options& o, const report& rep, const std::vector<std::string>& plots) {
    std::string s = "{\n  \"file\": " + json_string(o.file) + ",\n  \"task\": " + json_string(task_name(o.kind)) +
                    ",\n  \"rows\": " + std::to_string(d.truth.size());
    if (o.kind == task::binary)
        s += ",\n  \"positives\": " + std::to_string(d.positives) +
             ",\n  \"negatives\": " + std::to_string(d.negatives) + ",\n  \"threshold\": " + json_number(o.threshold);
    if (o.kind == task::multiclass)
        s += ",\n  \"classes\": " + std::to_string(d.classes);
    if (o.kind == task::query)
        s += ",\n  \"queries\": " + std::to_string(d.queries);
    if (o.kind == task::censored)
        s += ",\n  \"events\": " + std::to_string(d.events);
    s += ",\n  \"level\": " + json_number(o.level) +
         ",\n  \"splits\": " + (o.split.empty() ? std::string("null") : std::to_string(d.split_names.size())) +
         ",\n  \"measures\": [";
    for (std::size_t i = 0; i < rep.measures.size(); ++i)
        s += (i ? ", " : "") + std::string("{\"key\": ") + json_string(rep.measures[i].key) +
             ", \"name\": " + json_string(rep.measures[i].name) + "}";
    s += "],\n  \"models\": [";
    for (std::size_t m = 0; m < d.models.size(); ++m) {
        const auto& md = d.models[m];
        s += (m ? ",\n    {" : "\n    {");
        const char* kind = o.kind == task::binary       ? (md.probability ? "probability" : "score")
                           : o.kind == task::multiclass ? (md.cols > 1 ? "class probabilities" : "labels")
                                                        : "values";
        s += "\"name\": " + json_string(md.name) + ", \"scores\": " + json_string(kind) + ", \"estimates\": [";
        bool first = true;
        for (const auto& r : rep.estimates) {
            const auto& e = r.e;
            if (e.model != md.name)
                continue;
            s += first ? "\n      " : ",\n      ";
            first = false;
            s += "{\"key\": " + json_string(r.key) + ", \"measure\": " + json_string(e.measure) +
                 ", \"value\": " + json_number(e.value) + ", \"se\": " + json_number(e.se) +
                 ", \"lower\": " + json_number(e.lower) + ", \"upper\": " + json_number(e.upper) +
                 ", \"method\": " + json_string(heldout::ci::id_text(e.method)) +
                 ", \"method_label\": " + json_string(e.method_label) + ", \"splits\": " + std::to_string(e.splits) +
                 ", \"observations\": " + std::to_string(e.observations) +
                 ", \"clipped\": " + (r.clipped ? "true" : "false") + ", \"notes\": " + json_strings(e.notes) +
                 ", \"cautions\": " + json_strings(e.cautions) + "}";
        }
        s += "]}";
    }
    s += "\n  ],\n  \"comparisons\": [";
    for (std::size_t i = 0; i < rep.comparisons.size(); ++i) {
        const auto& c = rep.comparisons[i].c;
        s += i ? ",\n    " : "\n    ";
        s += "{\"key\": " + json_string(rep.comparisons[i].key) + ", \"first\": " + json_string(c.model_a) +
             ", \"second\": " + json_string(c.model_b) + ", \"measure\": " + json_string(c.measure) +
             ", \"difference\": " + json_number(c.difference) + ", \"se\": " + json_number(c.se) +
             ", \"lower\": " + json_number(c.lower) + ", \"upper\": " + json_number(c.upper) +
             ", \"statistic_name\": " + json_string(statistic_name(c)) +
             ", \"statistic\": " + json_number(c.statistic) + ", \"df\": " + json_number(c.df) +
             ", \"p_value\": " + json_number(c.p_value) + ", \"adjusted_p_value\": " + json_number(c.adjusted_p_value) +
             ", \"method\": " + json_string(heldout::paired::id_text(c.method)) +
             ", \"method_label\": " + json_string(c.method_label) + ", \"splits\": " + std::to_string(c.splits) +
             ", \"notes\": " + json_strings(c.notes) + ", \"cautions\": " + json_strings(c.cautions) + "}";
    }
    s += "\n  ],\n  \"notes\": " + json_strings(rep.notes) + ",\n  \"plots\": " + json_strings(plots);
    s += o.report.empty() ? std::string() : ",\n  \"report\": " + json_string(o.report);
    s += "\n}\n";
    std::cout << s;
}

/// Refuses NaN and infinities before the range checks (which NaN passes: every comparison
/// with it is false) with the same conversion CLI11 uses for doubles (strtod family); text
/// that is not a number at all is left to CLI11's own conversion error.
const CLI::Validator finite_number(
    [](std::string& text) -> std::string {
        const char* begin = text.c_str();
        char* end = nullptr;
        const double x = std::strtod(begin, &end);
        if (end == begin)
            return {};
        return std::isfinite(x) ? std::string() : "Value " + text + " is not a finite number";
    },
    "FINITE");

/// Writes what is buffered for standard output and checks that every write reached it (a
/// full disk, a closed pipe, /dev/full): io_error otherwise, so a lost result never exits 0.
void finish_stdout() {
    errno = 0;
    std::cout.flush();
    if (!std::cout || std::fflush(stdout) != 0 || std::ferror(stdout))
        throw io_error(std::string("writing standard output failed: ") + std::strerror(errno != 0 ? errno : EIO));
}

/// The command line's misuses that CLI11 does not see: a column named twice or for two roles,
/// columns a task needs or does not take, --model with several --score, --folds/--train-size
/// without --split or missing with it.
void check_usage(const options& o) {
    const task k = o.kind;
    if (k == task::censored) {
        if (o.time.empty() || o.event.empty())
            throw usage_error("--task censored needs --time COL and --event COL (1 = event seen, 0 = censored)");
        if (!o.truth.empty())
            throw usage_error("--task censored takes --time and --event instead of --truth");
    } else {
        if (o.truth.empty())
            throw usage_error("--truth is required (the task " + std::string(task_name(k)) + " reads its truth there)");
        if (!o.time.empty() || !o.event.empty())
            throw usage_error("--time and --event go with --task censored");
    }
    if (k == task::query && o.query.empty())
        throw usage_error("--task query needs --query COL (the query id of each row, whole numbers)");
    if (k != task::query && !o.query.empty())
        throw usage_error("--query goes with --task query");
    std::vector<std::pair<std::string, std::string>> roles;
    if (!o.truth.empty())
        roles.emplace_back("--truth", o.truth);
    for (const auto& sc : o.scores)
        roles.emplace_back("--score", sc);
    for (const auto& [flag, col] : {std::pair<std::string, std::string>{"--model", o.model},
                                    {"--split", o.split},
                                    {"--query", o.query},
                                    {"--time", o.time},
                                    {"--event", o.event}})
        if (!col.empty())
            roles.emplace_back(flag, col);
    for (std::size_t i = 0; i < roles.size(); ++i)
        for (std::size_t j = i + 1; j < roles.size(); ++j)
            if (roles[i].second == roles[j].second)
                throw usage_error("column '" + heldout_tool::csv_table::printable(roles[j].second) + "' is given " +
                                  (roles[i].first == roles[j].first
                                       ? "twice to " + roles[i].first
                                       : "to both " + roles[i].first + " and " + roles[j].first));
    if (!o.model.empty() && o.scores.size() != 1)
        throw usage_error("--model (long layout) takes exactly one --score column");
    if (!o.split.empty() && o.folds == 0 && o.train_size == 0)
        throw usage_error("--split needs --folds K or --train-size N: the corrected t accounts for splits "
                          "that share training rows through n_test/n_train");
    if (o.train_size != std::floor(o.train_size) || o.train_size > 1e15)
        throw usage_error("--train-size: " + heldout::report::number(o.train_size) + " is not a whole number of rows");
    if (o.split.empty() && (o.folds != 0 || o.train_size != 0))
        throw usage_error("--folds and --train-size go with --split");
}

/// The measures asked for (--measure, names separated by commas too), or the task's defaults.
std::vector<measure_entry> chosen_measures(const options& o) {
    std::vector<std::string> names;
    for (const auto& m : o.measures) {
        std::size_t start = 0;
        for (;;) {
            const auto comma = m.find(',', start);
            std::string one = m.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
            if (!one.empty())
                names.push_back(one);
            if (comma == std::string::npos)
                break;
            start = comma + 1;
        }
    }
    if (names.empty())
        names = heldout_tool::default_measures(o.kind);
    std::vector<measure_entry> out;
    for (const auto& n : names) {
        try {
            auto e = heldout_tool::parse_measure(o.kind, n, o.threshold);
            for (const auto& prev : out)
                if (prev.name == e.name)
                    throw usage_error("--measure: '" + n + "' is given twice (as '" + prev.key + "')");
            out.push_back(std::move(e));
        } catch (const heldout_tool::measure_name_error& e) {
            throw usage_error(e.what());
        }
    }
    return out;
}

task task_of(const std::string& text) {
    for (const task k : {task::regression, task::binary, task::multiclass, task::query, task::censored})
        if (task_name(k) == text)
            return k;
    return task::binary; // CLI11 checked the name
}

void list_measures(task k) {
    std::cout << "Measures of the " << task_name(k) << " task (* = a default):\n";
    for (const auto& h : heldout_tool::measures_of(k))
        std::cout << "  " << (h.default_ ? "* " : "  ") << pad(std::string(h.name), 18) << "  " << h.what << '\n';
}

} // namespace

int main(int argc, char** argv) {
    options o;
    CLI::App app{"heldout: estimates with confidence intervals, and valid pairwise comparisons, of models from a CSV "
                 "file of their predictions, for regression, binary, multiclass, query-ranking and censored "
                 "(time-to-event) tasks.",
                 "heldout"};
    app.add_option("FILE", o.file, "CSV file (RFC 4180, header line first); - reads standard input");
    std::string task_text = "binary";
    app.add_option("--task", task_text, "regression, binary (the default), multiclass, query or censored")
        ->check(CLI::IsMember({"regression", "binary", "multiclass", "query", "censored"}));
    app.add_option("--truth", o.truth,
                   "column of the truth: 0/1 (binary), a real value (regression), a class 0..k-1 (multiclass), a "
                   "graded relevance >= 0 (query)");
    app.add_option("--score,--prediction", o.scores,
                   "a model's prediction column: scores or probabilities of class 1 (binary), values (regression), "
                   "class labels, or class probabilities in columns NAME:0, NAME:1, ... (multiclass), ranking "
                   "scores (query), risk scores, higher = earlier event (censored). Repeat for more models (the "
                   "column name names the model), or give one with --model")
        ->required()
        ->expected(1)
        ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
    app.add_option("--model", o.model, "column naming the model of each row (long layout; one --score)");
    app.add_option("--query", o.query, "--task query: column of the query id of each row (whole numbers)");
    app.add_option("--time", o.time, "--task censored: column of the observed time (>= 0)");
    app.add_option("--event", o.event, "--task censored: column of the event indicator (1 = event, 0 = censored)");
    app.add_option("--split", o.split, "column naming the resampling split of each row (e.g. fold numbers)");
    auto* folds =
        app.add_option("--folds", o.folds, "with --split: the splits come from K-fold CV (n_test/n_train = 1/(K-1))")
            ->check(CLI::Range(2, 1000000));
    auto* train_size = app.add_option("--train-size", o.train_size, "with --split: rows each model was fitted on")
                           ->check(finite_number)
                           ->check(CLI::PositiveNumber);
    folds->excludes(train_size);
    app.add_option("--measure", o.measures,
                   "a measure by name (repeat, or separate by commas); --list-measures lists those of the task; "
                   "default: the task's defaults")
        ->expected(1)
        ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
    app.add_flag("--list-measures", o.list, "list the measures of the task (--task) by name, and exit");
    app.add_option("--threshold", o.threshold,
                   "binary: decide class 1 when the probability is at least this (default 0.5)")
        ->check(finite_number)
        ->check(CLI::Range(0.0, 1.0));
    app.add_option("--level", o.level, "confidence level of the intervals (default 0.95)")
        ->check(finite_number)
        ->check(CLI::Range(0.5, 0.9999));
    app.add_flag("--json", o.json, "print JSON instead of tables (numbers at full round-trip precision)");
    app.add_option("--plots", o.plots, "write SVG plots (ROC, calibration, per-split values) into this directory");
    app.add_option("--report", o.report,
                   "write one self-contained HTML report (tables, figures, notes; no external files) to this file");
    app.footer("Exit codes: 0 success; 1 a problem in the file's content (CSV syntax, a missing column, a cell that "
               "is not a number, truth other than 0/1, a class absent), with its line and column; 2 a usage "
               "error (an unknown option or measure, a missing or non-finite value, a value out of range, a column "
               "given twice); 3 a file, standard input or standard output that cannot be read or written; 4 an "
               "internal error.");
    try {
        app.parse(argc, argv);
        o.kind = task_of(task_text);
    } catch (const CLI::ParseError& e) {
        // --list-measures needs no FILE and no --score: answer it before the required checks
        if (o.list ||
            std::any_of(argv + 1, argv + argc, [](const char* a) { return std::strcmp(a, "--list-measures") == 0; })) {
            try {
                app.get_option("--score")->required(false);
                app.parse(argc, argv);
                list_measures(task_of(task_text));
                finish_stdout();
                return exit_ok;
            } catch (const CLI::ParseError& e2) {
                return app.exit(e2) == 0 ? exit_ok : exit_usage;
            } catch (const io_error& err) {
                std::cerr << "heldout: " << err.what() << '\n';
                return exit_io;
            }
        }
        const int code = app.exit(e); // --help prints to standard output: check that it got there
        try {
            finish_stdout();
        } catch (const io_error& err) {
            std::cerr << "heldout: " << err.what() << '\n';
            return exit_io;
        }
        return code == 0 ? exit_ok : exit_usage;
    }
    const std::string shown = o.file == "-" ? "standard input" : o.file; // the file in messages
    try {
        if (o.list) {
            list_measures(o.kind);
            finish_stdout();
            return exit_ok;
        }
        if (o.file.empty())
            throw usage_error("FILE is required");
        check_usage(o);
        auto measures = chosen_measures(o);
        const heldout_tool::csv_table t = heldout_tool::read_csv_file(o.file);
        const dataset d = read(t, o);
        const report rep = evaluate_all(d, o, std::move(measures));
        std::vector<std::string> plots;
        if (!o.plots.empty())
            plots = write_plots(d, o, rep);
        if (!o.report.empty())
            write_report(d, o, rep, shown);
        if (o.json)
            print_json(d, o, rep, plots);
        else {
            print_text(d, shown, o, rep);
            if (!plots.empty()) {
                std::cout << "\nPlots written to " << o.plots << ":";
                for (const auto& p : plots)
                    std::cout << ' ' << p;
                std::cout << '\n';
            }
            if (!o.report.empty())
                std::cout << "\nReport written to " << o.report << '\n';
        }
        finish_stdout();
        return exit_ok;
    } catch (const usage_error& e) {
        std::cerr << "heldout: " << e.what() << "\nRun with --help for more information.\n";
        return exit_usage;
    } catch (const io_error& e) { // files, standard input or output that cannot be read or written
        std::cerr << "heldout: " << e.what() << '\n';
        return exit_io;
    } catch (const heldout_tool::csv_error& e) {
        std::cerr << "heldout: " << shown << ": " << e.what() << '\n';
        return exit_data;
    } catch (const data_error& e) {
        std::cerr << "heldout: " << shown << ": " << e.what() << '\n';
        return exit_data;
    } catch (const heldout::input_error& e) { // undefined values on the whole file, bad values
        std::cerr << "heldout: " << shown << ": " << e.what() << '\n';
        return exit_data;
    } catch (const std::exception& e) { // not a result: a bug, or no memory
        std::cerr << "heldout: internal error: " << e.what() << '\n';
        return exit_internal;
    }
}
