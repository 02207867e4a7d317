// heldout — the prediction-file tool: estimates with intervals and pairwise comparisons of
// models from a CSV file of their predictions (see docs/tool.md).
//
//   heldout FILE --truth COL --score COL [--score COL ...] [--model COL] [--split COL]
//                [--folds K | --train-size N] [--threshold T] [--level L] [--json] [--plots DIR]
//
// One test set (no --split): classification error with the Wilson interval, Brier score
// with the t interval on per-row squared errors, AUC with the DeLong interval; pairs by
// McNemar's exact test (error), the paired t on per-row differences (Brier) and the DeLong
// test (AUC). Resampled predictions (--split): each measure per split, the corrected
// resampled t of Nadeau & Bengio (2003) over splits for estimates and for paired
// differences (n_test / n_train from --folds K, i.e. 1/(K-1), or --train-size).
#include "csv.hpp"

#include <heldout/compare/mcnemar.hpp>
#include <heldout/detail/json.hpp> // json_quote: the library's JSON string escaping
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/roc_points.hpp>
#include <heldout/report.hpp>

#include <CLI/CLI.hpp>
#include <boost/math/distributions/students_t.hpp>

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
    std::string truth;
    std::vector<std::string> scores;
    std::string model;
    std::string split;
    std::size_t folds = 0;
    double train_size = 0;
    double threshold = 0.5;
    double level = 0.95;
    bool json = false;
    std::string plots;
};

struct model_data {
    std::string name;
    std::vector<double> score;
    bool probability = true; // every score in [0, 1]
};

struct dataset {
    std::vector<std::uint8_t> truth;
    std::vector<model_data> models;
    std::vector<std::size_t> split;       // split number of each row (0 without --split)
    std::vector<std::string> split_names; // in order of first appearance
    std::size_t positives = 0, negatives = 0;
};

/// One estimate row of the report.
struct estimate_row {
    std::string model, measure;
    double value = 0;
    std::optional<double> lower, upper;
    std::string method;
    std::size_t splits = 1;
    bool clipped = false; // a t-family interval cut to [0, 1] (see clip_to_unit)
};

/// One pairwise comparison row.
struct comparison_row {
    std::string first, second, measure;
    double difference = 0;
    std::optional<double> lower, upper;
    std::string statistic_name;
    double statistic = 0;
    std::optional<double> df;
    double p_value = 1;
    std::string method;
};

std::string ordinal_row(std::size_t k) { return std::to_string(k + 1); }

// ---- reading --------------------------------------------------------------------------

dataset read(const heldout_tool::csv_table& t, const options& o) {
    dataset d;
    const std::size_t yc = t.column(o.truth);
    std::vector<std::size_t> score_cols;
    for (const auto& s : o.scores)
        score_cols.push_back(t.column(s));
    // Column numbers, or npos when the option is not given (not std::optional: g++ 12 -O3
    // warns maybe-uninitialized through it).
    constexpr std::size_t none = static_cast<std::size_t>(-1);
    const std::size_t model_col = o.model.empty() ? none : t.column(o.model);
    const std::size_t split_col = o.split.empty() ? none : t.column(o.split);
    const std::size_t* mc = model_col == none ? nullptr : &model_col;
    const std::size_t* sc = split_col == none ? nullptr : &split_col;
    if (t.rows() == 0)
        throw data_error("the file has a header but no data rows");

    auto truth_at = [&](std::size_t r) {
        const double v = t.number(r, yc);
        if (v != 0 && v != 1)
            throw data_error(t.where(r, yc) + ": truth must be 0 or 1, got '" +
                             heldout_tool::csv_table::printable(t.cell(r, yc)) + "'");
        return static_cast<std::uint8_t>(v);
    };
    std::map<std::string, std::size_t> split_index;
    auto split_at = [&](std::size_t r) -> std::size_t {
        if (!sc)
            return 0;
        const std::string& s = t.cell(r, *sc);
        if (s.empty())
            throw data_error(t.where(r, *sc) + ": empty split name");
        auto [it, fresh] = split_index.emplace(s, d.split_names.size());
        if (fresh)
            d.split_names.push_back(s);
        return it->second;
    };

    if (!mc) { // wide layout: one score column per model
        for (std::size_t m = 0; m < score_cols.size(); ++m)
            d.models.push_back({o.scores[m], {}, true});
        for (std::size_t r = 0; r < t.rows(); ++r) {
            d.truth.push_back(truth_at(r));
            d.split.push_back(split_at(r));
            for (std::size_t m = 0; m < score_cols.size(); ++m)
                d.models[m].score.push_back(t.number(r, score_cols[m]));
        }
    } else { // long layout: rows of each model in order; the i-th rows of all models are paired
        std::map<std::string, std::size_t> model_index;
        std::vector<std::vector<std::size_t>> rows_of;
        for (std::size_t r = 0; r < t.rows(); ++r) {
            const std::string& name = t.cell(r, *mc);
            if (name.empty())
                throw data_error(t.where(r, *mc) + ": empty model name");
            auto [it, fresh] = model_index.emplace(name, d.models.size());
            if (fresh) {
                d.models.push_back({name, {}, true});
                rows_of.emplace_back();
            }
            rows_of[it->second].push_back(r);
        }
        for (std::size_t m = 1; m < d.models.size(); ++m)
            if (rows_of[m].size() != rows_of[0].size())
                throw data_error("column " + std::to_string(*mc + 1) + " ('" + o.model + "'): model '" +
                                 d.models[m].name + "' has " + std::to_string(rows_of[m].size()) + " rows, model '" +
                                 d.models[0].name + "' has " + std::to_string(rows_of[0].size()) +
                                 " (the long layout pairs the i-th rows of every model)");
        const std::size_t n = rows_of[0].size();
        for (std::size_t i = 0; i < n; ++i) {
            const std::size_t r0 = rows_of[0][i];
            d.truth.push_back(truth_at(r0));
            d.split.push_back(split_at(r0));
            for (std::size_t m = 0; m < d.models.size(); ++m) {
                const std::size_t r = rows_of[m][i];
                if (m > 0 && truth_at(r) != d.truth.back())
                    throw data_error(t.where(r, yc) + ": truth differs from line " + std::to_string(t.line_of(r0)) +
                                     ", its pair (row " + ordinal_row(i) + " of every model)");
                if (m > 0 && sc && split_at(r) != d.split.back())
                    throw data_error(t.where(r, *sc) + ": split differs from line " + std::to_string(t.line_of(r0)) +
                                     ", its pair (row " + ordinal_row(i) + " of every model)");
                d.models[m].score.push_back(t.number(r, score_cols[0]));
            }
        }
    }
    if (d.split_names.empty())
        d.split_names.push_back("all");
    for (auto v : d.truth)
        (v ? d.positives : d.negatives) += 1;
    if (d.positives == 0 || d.negatives == 0)
        throw data_error("column " + std::to_string(yc + 1) + " ('" + o.truth + "'): class " +
                         (d.positives == 0 ? "1" : "0") + " never occurs; both classes are needed");
    for (auto& m : d.models)
        m.probability = std::all_of(m.score.begin(), m.score.end(), [](double s) { return s >= 0 && s <= 1; });
    return d;
}

// ---- computing ------------------------------------------------------------------------

std::vector<std::uint8_t> labels(const std::vector<double>& score, double threshold) {
    return heldout::labels_at(score, threshold);
}

std::vector<double> squared_errors(const std::vector<std::uint8_t>& y, const std::vector<double>& p) {
    std::vector<double> e(y.size());
    for (std::size_t i = 0; i < y.size(); ++i)
        e[i] = (p[i] - y[i]) * (p[i] - y[i]);
    return e;
}

double paired_t_p(double t, double df) {
    const boost::math::students_t dist(df);
    return 2 * boost::math::cdf(dist, -std::abs(t));
}

struct report {
    std::vector<estimate_row> estimates;
    std::vector<comparison_row> comparisons;
    std::vector<std::string> notes;
    // resampled only: measure -> (model, per-split values; absent where undefined)
    std::map<std::string, std::vector<std::pair<std::string, std::vector<std::optional<double>>>>> per_split;
};

/// Measures a model can be scored by: AUC always; error and Brier only for probabilities.
std::vector<std::string> measures_for(const model_data& m) {
    if (m.probability)
        return {"classification error", "Brier score", "AUC"};
    return {"AUC"};
}

/// A t-family interval (mean +- t se) of a measure bounded in [0, 1] (classification error,
/// Brier score of probabilities, AUC) can reach outside [0, 1]; values there are impossible,
/// so the interval is cut to [0, 1], and a note says so (with the uncut interval).
void clip_to_unit(estimate_row& e, report& rep) {
    if (!e.lower || !e.upper || (*e.lower >= 0 && *e.upper <= 1))
        return;
    const double lo = *e.lower, hi = *e.upper;
    e.lower = std::max(0.0, lo);
    e.upper = std::min(1.0, hi);
    e.clipped = true;
    rep.notes.push_back(e.model + ", " + e.measure + ": the " + e.method + " interval [" +
                        heldout::report::number(lo, 4) + ", " + heldout::report::number(hi, 4) +
                        "] reaches outside [0, 1], where the measure lies; clipped to [" +
                        heldout::report::number(*e.lower, 4) + ", " + heldout::report::number(*e.upper, 4) + "]");
}

report one_test_set(const dataset& d, const options& o) {
    report rep;
    const std::size_t n = d.truth.size();
    for (const auto& m : d.models) {
        if (m.probability) {
            const auto lab = labels(m.score, o.threshold);
            std::size_t errors = 0;
            for (std::size_t i = 0; i < n; ++i)
                errors += lab[i] != d.truth[i];
            const auto w = heldout::wilson_interval(errors, n, o.level);
            rep.estimates.push_back({m.name, "classification error", w.estimate, w.lower, w.upper, "Wilson score", 1});
            const auto b = heldout::t_interval(squared_errors(d.truth, m.score), o.level);
            rep.estimates.push_back({m.name, "Brier score", b.mean, b.lower, b.upper, "t on per-row losses", 1});
            clip_to_unit(rep.estimates.back(), rep); // probabilities: the Brier score lies in [0, 1]
        }
        try {
            const auto a = heldout::delong_auc(d.truth, m.score, o.level);
            rep.estimates.push_back({m.name, "AUC", a.value, a.lower, a.upper, "DeLong, logit scale", 1});
        } catch (const heldout::undefined_error& e) { // e.g. AUC = 1: no DeLong variance
            const double a = heldout::evaluate(heldout::measure::auc{}, d.truth, m.score);
            rep.estimates.push_back({m.name, "AUC", a, std::nullopt, std::nullopt, "no interval", 1});
            rep.notes.push_back(m.name + ", AUC: " + e.what());
        }
    }
    for (std::size_t i = 0; i < d.models.size(); ++i)
        for (std::size_t j = i + 1; j < d.models.size(); ++j) {
            const auto& a = d.models[i];
            const auto& b = d.models[j];
            if (a.probability && b.probability) {
                const auto la = labels(a.score, o.threshold), lb = labels(b.score, o.threshold);
                const auto mc = heldout::mcnemar_test(d.truth, la, lb, heldout::mcnemar::exact);
                const double diff = (static_cast<double>(mc.only_b_correct) - static_cast<double>(mc.only_a_correct)) /
                                    static_cast<double>(n); // error(a) - error(b)
                rep.comparisons.push_back({a.name, b.name, "classification error", diff, std::nullopt, std::nullopt,
                                           "b", mc.statistic, std::nullopt, mc.p_value,
                                           "McNemar exact (" + std::to_string(mc.only_a_correct) +
                                               " only first right, " + std::to_string(mc.only_b_correct) +
                                               " only second right)"});
                const auto ea = squared_errors(d.truth, a.score), eb = squared_errors(d.truth, b.score);
                std::vector<double> diffs(n);
                for (std::size_t r = 0; r < n; ++r)
                    diffs[r] = ea[r] - eb[r];
                const auto t = heldout::t_interval(diffs, o.level);
                if (t.se > 0) {
                    const double stat = t.mean / t.se;
                    rep.comparisons.push_back({a.name, b.name, "Brier score", t.mean, t.lower, t.upper, "t", stat, t.df,
                                               paired_t_p(stat, t.df), "paired t on per-row differences"});
                } else {
                    rep.notes.push_back("Brier score, " + a.name + " vs " + b.name +
                                        ": identical squared errors on every row; no test");
                }
            }
            try {
                const auto dt = heldout::delong_test(d.truth, a.score, b.score, o.level);
                rep.comparisons.push_back({a.name, b.name, "AUC", dt.difference, dt.lower, dt.upper, "z", dt.z,
                                           std::nullopt, dt.p_value, "DeLong paired"});
            } catch (const heldout::undefined_error& e) {
                rep.notes.push_back("AUC, " + a.name + " vs " + b.name + ": " + e.what());
            }
        }
    return rep;
}

report resampled(const dataset& d, const options& o) {
    report rep;
    const std::size_t k = d.split_names.size();
    if (k < 2)
        throw data_error("column '" + o.split + "' names one split only; resampled estimates need at least two");
    std::vector<std::vector<std::size_t>> rows(k);
    for (std::size_t r = 0; r < d.truth.size(); ++r)
        rows[d.split[r]].push_back(r);
    double n_test = 0;
    for (const auto& r : rows)
        n_test += static_cast<double>(r.size());
    n_test /= static_cast<double>(k);
    const double n_train = o.train_size > 0 ? o.train_size : static_cast<double>(o.folds - 1) * n_test;

    // values[m][measure] = per-split values (nullopt where undefined)
    const std::vector<std::string> all_measures{"classification error", "Brier score", "AUC"};
    auto value_on = [&](const model_data& m, const std::string& measure, const std::vector<std::size_t>& r,
                        std::string& why) -> std::optional<double> {
        std::vector<std::uint8_t> y(r.size());
        std::vector<double> s(r.size());
        for (std::size_t i = 0; i < r.size(); ++i) {
            y[i] = d.truth[r[i]];
            s[i] = m.score[r[i]];
        }
        try {
            if (measure == "classification error")
                return heldout::evaluate(heldout::measure::classification_error{}, y, labels(s, o.threshold));
            if (measure == "Brier score") {
                const auto e = squared_errors(y, s);
                double sum = 0;
                for (double x : e)
                    sum += x;
                return sum / static_cast<double>(e.size());
            }
            return heldout::evaluate(heldout::measure::auc{}, y, s);
        } catch (const heldout::undefined_error& e) {
            why = e.what();
            return std::nullopt;
        }
    };
    std::map<std::pair<std::size_t, std::string>, std::vector<std::optional<double>>> values;
    for (std::size_t m = 0; m < d.models.size(); ++m)
        for (const auto& measure : measures_for(d.models[m])) {
            auto& v = values[{m, measure}];
            std::size_t undefined = 0;
            std::string why;
            for (std::size_t s = 0; s < k; ++s) {
                v.push_back(value_on(d.models[m], measure, rows[s], why));
                undefined += !v.back();
            }
            rep.per_split[measure].emplace_back(d.models[m].name, v);
            if (undefined)
                rep.notes.push_back(d.models[m].name + ", " + measure + ": " + std::to_string(undefined) + " of " +
                                    std::to_string(k) + " splits undefined (" + why + ")");
            std::vector<double> defined;
            for (const auto& x : v)
                if (x)
                    defined.push_back(*x);
            if (defined.size() < 2) {
                rep.notes.push_back(d.models[m].name + ", " + measure + ": fewer than two defined splits; no estimate");
                continue;
            }
            try {
                const auto c = heldout::corrected_resampled_t(defined, n_train, n_test, o.level);
                rep.estimates.push_back({d.models[m].name, measure, c.mean, c.lower, c.upper,
                                         "corrected t (Nadeau-Bengio)", defined.size()});
                clip_to_unit(rep.estimates.back(), rep); // error, Brier of probabilities and AUC lie in [0, 1]
            } catch (const heldout::undefined_error&) {  // every split gave the same value
                rep.estimates.push_back({d.models[m].name, measure, defined.front(), std::nullopt, std::nullopt,
                                         "constant over splits, no interval", defined.size()});
            }
        }
    for (std::size_t i = 0; i < d.models.size(); ++i)
        for (std::size_t j = i + 1; j < d.models.size(); ++j)
            for (const auto& measure : all_measures) {
                auto a = values.find({i, measure}), b = values.find({j, measure});
                if (a == values.end() || b == values.end())
                    continue;
                std::vector<double> diffs;
                for (std::size_t s = 0; s < k; ++s)
                    if (a->second[s] && b->second[s])
                        diffs.push_back(*a->second[s] - *b->second[s]);
                if (diffs.size() < 2)
                    continue;
                try {
                    const auto c = heldout::corrected_resampled_t(diffs, n_train, n_test, o.level);
                    rep.comparisons.push_back({d.models[i].name, d.models[j].name, measure, c.mean, c.lower, c.upper,
                                               "t", c.statistic, c.df, c.p_value,
                                               "corrected resampled t (Nadeau-Bengio)"});
                } catch (const heldout::undefined_error&) {
                    rep.notes.push_back(measure + ", " + d.models[i].name + " vs " + d.models[j].name +
                                        ": the same difference on every split; no test");
                }
            }
    char buf[200];
    std::snprintf(buf, sizeof buf, "corrected t: n_test = %.6g rows per split (mean), n_train = %.6g (%s)", n_test,
                  n_train, o.train_size > 0 ? "--train-size" : "(K - 1) n_test with --folds");
    rep.notes.push_back(buf);
    return rep;
}

// ---- plots ----------------------------------------------------------------------------

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
    {
        std::vector<heldout::report::roc_series> roc;
        for (const auto& m : d.models)
            roc.push_back(heldout::report::roc_series_of(
                m.name + " (AUC " +
                    heldout::report::number(heldout::evaluate(heldout::measure::auc{}, d.truth, m.score), 3) + ")",
                heldout::roc_points(d.truth, m.score)));
        save(heldout::report::roc_plot(roc, "ROC curves", o.split.empty() ? "" : "all splits pooled"),
             (fs::path(o.plots) / "roc.svg").string());
        written.push_back("roc.svg");
    }
    std::vector<heldout::report::calibration_series> cal;
    for (const auto& m : d.models)
        if (m.probability)
            cal.push_back({m.name, heldout::report::reliability_bins(d.truth, m.score, 10)});
    if (!cal.empty()) {
        save(heldout::report::calibration_plot(cal), (fs::path(o.plots) / "calibration.svg").string());
        written.push_back("calibration.svg");
    }
    // per-split values as strip plots, one per measure; paired when every split is defined
    const char* measures[][2] = {{"classification error", "folds_classification_error.svg"},
                                 {"Brier score", "folds_brier_score.svg"},
                                 {"AUC", "folds_auc.svg"}};
    for (const auto& [measure, file] : measures) {
        const auto it = rep.per_split.find(measure);
        if (it == rep.per_split.end())
            continue;
        std::vector<heldout::report::strip_group> groups;
        bool complete = true;
        for (const auto& [name, values] : it->second) {
            heldout::report::strip_group g{name, {}};
            for (const auto& v : values) {
                complete = complete && v.has_value();
                if (v)
                    g.values.push_back(*v);
            }
            if (!g.values.empty())
                groups.push_back(std::move(g));
        }
        if (groups.empty())
            continue;
        save(heldout::report::strip_plot(groups, {.title = std::string(measure) + " per split",
                                                  .value_label = measure,
                                                  .subtitle = "split column '" + o.split + "'",
                                                  .paired = complete}),
             (fs::path(o.plots) / file).string());
        written.push_back(file);
    }
    return written;
}

// ---- output ---------------------------------------------------------------------------

std::string num(double x) { return heldout::report::number(x, 4); }
std::string p_text(double p) { return p < 1e-4 ? "<0.0001" : num(p); }

std::string pad(std::string s, std::size_t w) {
    if (s.size() < w)
        s.append(w - s.size(), ' ');
    return s;
}

void print_text(const dataset& d, const std::string& shown, const options& o, const report& rep) {
    std::cout << "heldout: " << shown << ": " << d.truth.size() << " rows, " << d.models.size()
              << (d.models.size() == 1 ? " model" : " models") << ", truth '" << o.truth << "' (" << d.positives
              << " of class 1, " << d.negatives << " of class 0), ";
    if (o.split.empty())
        std::cout << "one test set\n";
    else
        std::cout << d.split_names.size() << " splits in column '" << o.split << "'\n";
    std::cout << "Decisions at threshold " << heldout::report::number(o.threshold) << "; intervals at "
              << heldout::report::number(o.level * 100) << "%.\n\nEstimates\n";
    std::size_t wm = 5;
    for (const auto& m : d.models)
        wm = std::max(wm, m.name.size());
    std::cout << "  " << pad("model", wm) << "  " << pad("measure", 20) << "  " << pad("value", 8) << "  "
              << pad("interval", 18) << "  method\n";
    for (const auto& e : rep.estimates) {
        const std::string iv = e.lower ? "[" + num(*e.lower) + ", " + num(*e.upper) + "]" : "-";
        std::cout << "  " << pad(e.model, wm) << "  " << pad(e.measure, 20) << "  " << pad(num(e.value), 8) << "  "
                  << pad(iv, 18) << "  " << e.method;
        if (!o.split.empty())
            std::cout << ", " << e.splits << " splits";
        std::cout << '\n';
    }
    if (!rep.comparisons.empty()) {
        std::cout << "\nPairwise comparisons (difference = first - second)\n";
        std::size_t wp = 4;
        for (const auto& c : rep.comparisons)
            wp = std::max(wp, c.first.size() + c.second.size() + 4);
        std::cout << "  " << pad("pair", wp) << "  " << pad("measure", 20) << "  " << pad("diff.", 8) << "  "
                  << pad("interval", 18) << "  " << pad("statistic", 14) << "  " << pad("p", 8) << "  test\n";
        for (const auto& c : rep.comparisons) {
            const std::string iv = c.lower ? "[" + num(*c.lower) + ", " + num(*c.upper) + "]" : "-";
            std::cout << "  " << pad(c.first + " vs " + c.second, wp) << "  " << pad(c.measure, 20) << "  "
                      << pad(num(c.difference), 8) << "  " << pad(iv, 18) << "  "
                      << pad(c.statistic_name + " = " + heldout::report::number(c.statistic, 3), 14) << "  "
                      << pad(p_text(c.p_value), 8) << "  " << c.method << '\n';
        }
    }
    for (const auto& m : d.models)
        if (!m.probability)
            std::cout << "\nnote: " << m.name
                      << ": scores outside [0, 1] are ranked only (AUC); the Brier score and the classification "
                         "error need probabilities";
    for (const auto& n : rep.notes)
        std::cout << "\nnote: " << n;
    if (!rep.notes.empty() || std::any_of(d.models.begin(), d.models.end(), [](auto& m) { return !m.probability; }))
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
std::string json_number(double x) { return heldout::report::number(x); }
std::string json_number(const std::optional<double>& x) { return x ? json_number(*x) : "null"; }

void print_json(const dataset& d, const options& o, const report& rep, const std::vector<std::string>& plots) {
    std::string s =
        "{\n  \"file\": " + json_string(o.file) + ",\n  \"rows\": " + std::to_string(d.truth.size()) +
        ",\n  \"positives\": " + std::to_string(d.positives) + ",\n  \"negatives\": " + std::to_string(d.negatives) +
        ",\n  \"level\": " + json_number(o.level) + ",\n  \"threshold\": " + json_number(o.threshold) +
        ",\n  \"splits\": " + (o.split.empty() ? std::string("null") : std::to_string(d.split_names.size())) +
        ",\n  \"models\": [";
    for (std::size_t m = 0; m < d.models.size(); ++m) {
        s += (m ? ",\n    {" : "\n    {");
        s += "\"name\": " + json_string(d.models[m].name) +
             ", \"scores\": " + json_string(d.models[m].probability ? "probability" : "score") + ", \"estimates\": [";
        bool first = true;
        for (const auto& e : rep.estimates) {
            if (e.model != d.models[m].name)
                continue;
            s += first ? "\n      " : ",\n      ";
            first = false;
            s += "{\"measure\": " + json_string(e.measure) + ", \"value\": " + json_number(e.value) +
                 ", \"lower\": " + json_number(e.lower) + ", \"upper\": " + json_number(e.upper) +
                 ", \"method\": " + json_string(e.method) + ", \"splits\": " + std::to_string(e.splits) +
                 ", \"clipped\": " + (e.clipped ? "true" : "false") + "}";
        }
        s += "]}";
    }
    s += "\n  ],\n  \"comparisons\": [";
    for (std::size_t i = 0; i < rep.comparisons.size(); ++i) {
        const auto& c = rep.comparisons[i];
        s += i ? ",\n    " : "\n    ";
        s += "{\"first\": " + json_string(c.first) + ", \"second\": " + json_string(c.second) +
             ", \"measure\": " + json_string(c.measure) + ", \"difference\": " + json_number(c.difference) +
             ", \"lower\": " + json_number(c.lower) + ", \"upper\": " + json_number(c.upper) +
             ", \"statistic_name\": " + json_string(c.statistic_name) + ", \"statistic\": " + json_number(c.statistic) +
             ", \"df\": " + json_number(c.df) + ", \"p_value\": " + json_number(c.p_value) +
             ", \"method\": " + json_string(c.method) + "}";
    }
    s += "\n  ],\n  \"notes\": [";
    for (std::size_t i = 0; i < rep.notes.size(); ++i)
        s += (i ? ", " : "") + json_string(rep.notes[i]);
    s += "],\n  \"plots\": [";
    for (std::size_t i = 0; i < plots.size(); ++i)
        s += (i ? ", " : "") + json_string(plots[i]);
    s += "]\n}\n";
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
/// --model with several --score, --folds/--train-size without --split or missing with it.
void check_usage(const options& o) {
    std::vector<std::pair<std::string, std::string>> roles{{"--truth", o.truth}};
    for (const auto& sc : o.scores)
        roles.emplace_back("--score", sc);
    if (!o.model.empty())
        roles.emplace_back("--model", o.model);
    if (!o.split.empty())
        roles.emplace_back("--split", o.split);
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
    if (o.split.empty() && (o.folds != 0 || o.train_size != 0))
        throw usage_error("--folds and --train-size go with --split");
}

} // namespace

int main(int argc, char** argv) {
    options o;
    CLI::App app{"heldout: estimates with confidence intervals, and valid pairwise comparisons, of models from a CSV "
                 "file of their predictions (truth 0/1, one score or probability column per model).",
                 "heldout"};
    app.add_option("FILE", o.file, "CSV file (RFC 4180, header line first); - reads standard input")->required();
    app.add_option("--truth", o.truth, "column of the true class, 0 or 1")->required();
    app.add_option("--score", o.scores,
                   "column of a model's scores or probabilities of class 1; repeat for more models (the column name "
                   "names the model), or give one with --model")
        ->required()
        ->expected(1)
        ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
    app.add_option("--model", o.model, "column naming the model of each row (long layout; one --score)");
    app.add_option("--split", o.split, "column naming the resampling split of each row (e.g. fold numbers)");
    auto* folds =
        app.add_option("--folds", o.folds, "with --split: the splits come from K-fold CV (n_test/n_train = 1/(K-1))")
            ->check(CLI::Range(2, 1000000));
    auto* train_size = app.add_option("--train-size", o.train_size, "with --split: rows each model was fitted on")
                           ->check(finite_number)
                           ->check(CLI::PositiveNumber);
    folds->excludes(train_size);
    app.add_option("--threshold", o.threshold, "decide class 1 when the probability is at least this (default 0.5)")
        ->check(finite_number)
        ->check(CLI::Range(0.0, 1.0));
    app.add_option("--level", o.level, "confidence level of the intervals (default 0.95)")
        ->check(finite_number)
        ->check(CLI::Range(0.5, 0.9999));
    app.add_flag("--json", o.json, "print JSON instead of tables (numbers at full round-trip precision)");
    app.add_option("--plots", o.plots, "write SVG plots (ROC, calibration, per-split values) into this directory");
    app.footer("Exit codes: 0 success; 1 a problem in the file's content (CSV syntax, a missing column, a cell that "
               "is not a number, truth other than 0/1, a class absent), with its line and column; 2 a usage "
               "error (an unknown option, a missing or non-finite value, a value out of range, a column given "
               "twice); 3 a file, standard input or standard output that cannot be read or written; 4 an "
               "internal error.");
    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
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
        check_usage(o);
        const heldout_tool::csv_table t = heldout_tool::read_csv_file(o.file);
        const dataset d = read(t, o);
        const report rep = o.split.empty() ? one_test_set(d, o) : resampled(d, o);
        std::vector<std::string> plots;
        if (!o.plots.empty())
            plots = write_plots(d, o, rep);
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
