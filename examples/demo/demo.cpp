// heldout_demo — the whole job on an invented fleet of pumps (examples/demo/scenario.hpp):
// will a pump fail within 30 days? Two learners written small for the demo (logistic
// regression by IRLS, k nearest neighbours) are evaluated the way heldout says they should be:
//   1. the data and the cost of mistakes;
//   2. training error against held-out error (training error is optimistic);
//   3. repeated stratified 10-fold cross-validation: classification error, cost-weighted
//      error, Brier score and AUC, each with its interval and the method behind it;
//   4. the paired comparison of the two learners, with a test that is valid for
//      resampled data, and its p-value;
//   5. the cost-optimal threshold;
//   6. SVG pictures (ROC curves, calibration diagram, per-fold values) in a directory.
//
//   ./build/release/examples/heldout_demo [OUTPUT_DIR]
// The pictures go to OUTPUT_DIR, by default the build folder's demo_output/ (HELDOUT_DEMO_OUTPUT,
// set by examples/demo/CMakeLists.txt), never into the source tree.
#include "knn.hpp"
#include "logistic.hpp"
#include "scenario.hpp"

#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/cost_weighted_error.hpp>
#include <heldout/measure/roc_points.hpp>
#include <heldout/measure/threshold.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/structure.hpp>
#include <heldout/report.hpp>

#include <Eigen/Dense>

#include <algorithm>
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <numeric>
#include <optional>
#include <string>
#include <unistd.h>
#include <vector>

namespace {

/// A progress line on stderr, only on a terminal and only once a task has run for a second.
class progress {
public:
    progress(std::string what, std::size_t total)
        : what_(std::move(what)), total_(total), tty_(isatty(fileno(stderr)) != 0),
          start_(std::chrono::steady_clock::now()), last_(start_) {}
    void step() {
        ++done_;
        if (!tty_)
            return;
        const auto now = std::chrono::steady_clock::now();
        if (now - start_ < std::chrono::seconds(1) || now - last_ < std::chrono::milliseconds(100))
            return;
        last_ = now;
        shown_ = true;
        std::fprintf(stderr, "\r  %s: %zu of %zu (%.0f%%)", what_.c_str(), done_, total_,
                     100.0 * static_cast<double>(done_) / static_cast<double>(total_));
        std::fflush(stderr);
    }
    ~progress() {
        if (shown_)
            std::fprintf(stderr, "\r%*s\r", static_cast<int>(what_.size() + 40), "");
    }

private:
    std::string what_;
    std::size_t total_, done_ = 0;
    bool tty_, shown_ = false;
    std::chrono::steady_clock::time_point start_, last_;
};

void heading(const char* text) { std::printf("\n== %s ==\n\n", text); }

std::string fixed(double x, int decimals = 4) { return heldout::report::number(x, decimals); }

std::string interval_text(const std::optional<double>& lower, const std::optional<double>& upper) {
    if (!lower || !upper)
        return "(no interval)";
    return "[" + fixed(*lower) + ", " + fixed(*upper) + "]";
}
std::string interval_text(const heldout::estimate& e) { return interval_text(e.lower, e.upper); }

std::string p_text(double p) { return p < 1e-4 ? "<0.0001" : fixed(p, 4); }

template <class M>
double whole_set(const M& m, const std::vector<std::uint8_t>& y, const std::vector<double>& p, double threshold) {
    if constexpr (M::kind == heldout::prediction_kind::label)
        return heldout::evaluate(m, y, heldout::labels_at(p, threshold));
    else
        return heldout::evaluate(m, y, p);
}

} // namespace

int main(int argc, char** argv) try {
#ifndef HELDOUT_DEMO_OUTPUT
#define HELDOUT_DEMO_OUTPUT "heldout_demo_output"
#endif
    const std::filesystem::path plot_dir = argc > 1 ? argv[1] : HELDOUT_DEMO_OUTPUT;
    constexpr std::size_t n = 1200;
    constexpr std::uint64_t seed = 2026;
    const demo::fleet fleet = demo::make_fleet(n, seed);
    const std::vector<std::uint8_t>& y = fleet.failed;
    const std::size_t failures = std::accumulate(y.begin(), y.end(), std::size_t{0});

    // Costs: a missed failure (false negative) means an unplanned shutdown and a wrecked
    // pump; an unneeded inspection (false positive) costs a technician's visit.
    Eigen::MatrixXd costs(2, 2);
    costs << 0, 1, //  true "no failure": predicted no failure 0, predicted failure (inspection) 1
        10, 0;     //  true "failure":    predicted no failure (missed) 10, predicted failure 0
    const double c_fp = costs(0, 1), c_fn = costs(1, 0);
    // For calibrated probabilities, flagging when P(failure) >= c_fp / (c_fp + c_fn)
    // minimises the expected cost (Elkan 2001, "The foundations of cost-sensitive
    // learning", IJCAI, Theorem 1): fixed before looking at the data, so it adds no optimism.
    const double cost_threshold = c_fp / (c_fp + c_fn);

    const heldout::measure::classification_error error;
    const heldout::measure::cost_weighted_error cost(costs);
    const heldout::measure::brier_score brier;
    const heldout::measure::auc auc;

    heading("1. The fleet (invented, generated by examples/demo/scenario.hpp, seed 2026)");
    std::printf("%zu pumps; features: vibration (mm/s RMS), bearing temperature (C), running hours since\n"
                "overhaul (1000 h); outcome: fails within 30 days (%zu pumps, %.1f%%).\n\n",
                n, failures, 100.0 * static_cast<double>(failures) / n);
    std::printf("Cost matrix (rows: truth, columns: decision):\n"
                "                      no inspection   inspect\n"
                "  no failure               %4.0f        %4.0f    (an unneeded inspection)\n"
                "  failure                  %4.0f        %4.0f    (a missed failure)\n",
                costs(0, 0), costs(0, 1), costs(1, 0), costs(1, 1));
    std::printf("Decisions: classification error flags a pump at P(failure) >= 0.5; the cost-weighted\n"
                "error flags it at P(failure) >= c_FP / (c_FP + c_FN) = %s (Elkan 2001).\n",
                fixed(cost_threshold, 4).c_str());

    demo::logistic_regression logistic;
    demo::nearest_neighbours knn;
    knn.k = 15;
    const std::vector<std::string> names{"logistic regression", "15-nearest neighbours"};
    auto fit_predict = [&](std::size_t model, std::span<const std::size_t> train, std::span<const std::size_t> test) {
        if (model == 0) {
            logistic.fit(fleet.features, y, train);
            return logistic.predict(fleet.features, test);
        }
        knn.fit(fleet.features, y, train);
        return knn.predict(fleet.features, test);
    };

    // ---- 2. training error against held-out error
    std::vector<std::size_t> all(n);
    std::iota(all.begin(), all.end(), std::size_t{0});
    std::vector<std::vector<double>> fitted(2);
    for (std::size_t m = 0; m < 2; ++m)
        fitted[m] = fit_predict(m, all, all);

    // ---- 3. repeated stratified 10-fold cross-validation: one loop, both learners fitted on
    // each split; probabilities go to one aggregator per learner, thresholded decisions to two more.
    const auto plan = heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = seed};
    std::vector<heldout::aggregator> probs, decisions, cost_decisions;
    for (std::size_t m = 0; m < 2; ++m) {
        probs.emplace_back(brier, auc);
        decisions.emplace_back(error);
        cost_decisions.emplace_back(cost);
    }
    std::vector<std::vector<double>> out_of_fold(2, std::vector<double>(n)); // repeat 0: every row once
    std::vector<std::uint8_t> truth_of_test;
    {
        auto splits = plan.splits(heldout::strata(y));
        progress bar("10 x 10-fold cross-validation", 2 * plan.folds * plan.repeats);
        for (const heldout::split& s : splits) {
            truth_of_test.resize(s.test.size());
            for (std::size_t i = 0; i < s.test.size(); ++i)
                truth_of_test[i] = y[s.test[i]];
            for (std::size_t m = 0; m < 2; ++m) {
                const std::vector<double> p = fit_predict(m, s.train, s.test);
                probs[m].record(s, truth_of_test, p);
                decisions[m].record(s, truth_of_test, heldout::labels_at(p, 0.5));
                cost_decisions[m].record(s, truth_of_test, heldout::labels_at(p, cost_threshold));
                if (s.repeat == 0)
                    for (std::size_t i = 0; i < s.test.size(); ++i)
                        out_of_fold[m][s.test[i]] = p[i];
                bar.step();
            }
        }
    }
    auto estimate_of = [&](std::size_t m, std::size_t which) {
        switch (which) {
        case 0:
            return decisions[m].estimate(error);
        case 1:
            return cost_decisions[m].estimate(cost);
        case 2:
            return probs[m].estimate(brier);
        default:
            return probs[m].estimate(auc);
        }
    };
    const char* measure_names[] = {"classification error", "cost-weighted error", "Brier score", "AUC"};

    heading("2. Training error is optimistic");
    std::printf("Each learner fitted on all %zu pumps and scored on the same pumps (training error), against\n"
                "the cross-validated estimate of its error on new pumps (section 3):\n\n",
                n);
    std::printf("  %-22s  %-20s  %10s  %10s\n", "learner", "measure", "training", "held-out");
    for (std::size_t m = 0; m < 2; ++m)
        for (std::size_t which = 0; which < 3; ++which) {
            double train_value = 0;
            if (which == 0)
                train_value = whole_set(error, y, fitted[m], 0.5);
            else if (which == 1)
                train_value = whole_set(cost, y, fitted[m], cost_threshold);
            else
                train_value = whole_set(brier, y, fitted[m], 0);
            std::printf("  %-22s  %-20s  %10s  %10s\n", which == 0 ? names[m].c_str() : "", measure_names[which],
                        fixed(train_value).c_str(), fixed(estimate_of(m, which).value).c_str());
        }
    std::printf("\nk-NN scores each training pump with itself among its 15 neighbours, so its training error\n"
                "flatters it most; the logistic model has 4 parameters and is flattered less.\n");

    heading("3. Repeated stratified 10-fold cross-validation (10 repeats, 100 splits per learner)");
    std::printf("Values are means over the 100 splits; intervals are 95%%, by the method named. The\n"
                "corrected resampled t (Nadeau & Bengio 2003) widens the naive t interval over splits,\n"
                "which ignores that the splits share training rows.\n\n");
    std::vector<std::vector<heldout::estimate>> table(2);
    std::vector<std::string> notes, methods;
    for (std::size_t m = 0; m < 2; ++m)
        for (std::size_t which = 0; which < 4; ++which) {
            table[m].push_back(estimate_of(m, which));
            if (std::find(methods.begin(), methods.end(), table[m].back().method_label) == methods.end())
                methods.push_back(table[m].back().method_label);
            for (const auto& note : table[m].back().notes)
                if (std::find(notes.begin(), notes.end(), note) == notes.end())
                    notes.push_back(note);
        }
    const bool one_method = methods.size() == 1; // then it is named once, under the table
    std::printf("  %-22s  %-20s  %8s  %s\n", "learner", "measure", "value",
                one_method ? "95% interval" : "95% interval        method");
    for (std::size_t m = 0; m < 2; ++m)
        for (std::size_t which = 0; which < 4; ++which) {
            const heldout::estimate& e = table[m][which];
            std::string interval = interval_text(e);
            if (!one_method)
                interval += std::string(interval.size() < 18 ? 18 - interval.size() : 0, ' ') + "  " + e.method_label;
            std::printf("  %-22s  %-20s  %8s  %s\n", which == 0 ? names[m].c_str() : "", measure_names[which],
                        fixed(e.value).c_str(), interval.c_str());
        }
    if (one_method)
        std::printf("\n  method: %s", methods[0].c_str());
    for (const auto& note : notes) { // wrapped at about 96 columns
        std::string line = "  note:";
        std::size_t from = 0;
        while (from < note.size()) {
            std::size_t to = note.find(' ', from);
            if (to == std::string::npos)
                to = note.size();
            if (line.size() + 1 + (to - from) > 96) {
                std::printf("\n%s", line.c_str());
                line = "       ";
            }
            line += ' ';
            line.append(note, from, to - from);
            from = to + 1;
        }
        std::printf("\n%s", line.c_str());
    }
    std::printf("\n");
    {
        const auto naive = decisions[0].estimate(error, heldout::ci::naive_t);
        std::printf("\nFor contrast, the naive t over the same 100 splits gives %s %s for the logistic\n"
                    "model's classification error: narrower, and known to undercover.\n",
                    fixed(naive.value).c_str(), interval_text(naive).c_str());
    }

    heading("4. Which learner is better? (paired, on the same 100 splits)");
    std::printf("Difference = %s minus %s, split by split. heldout::compare picks\n"
                "the valid test for 10 x 10-fold CV: the corrected repeated k-fold t (Nadeau & Bengio 2003;\n"
                "Bouckaert & Frank 2004). Lower is better for the errors and the Brier score, higher for AUC.\n\n",
                names[0].c_str(), names[1].c_str());
    std::printf("  %-20s  %8s  %-18s  %7s  %4s  %8s  %s\n", "measure", "diff.", "95% interval", "t", "df", "p",
                "naive t p");
    std::string method;
    for (std::size_t which = 0; which < 4; ++which) {
        auto both = [&](heldout::paired::method method) {
            switch (which) {
            case 0:
                return heldout::compare(decisions[0], decisions[1], error, method);
            case 1:
                return heldout::compare(cost_decisions[0], cost_decisions[1], cost, method);
            case 2:
                return heldout::compare(probs[0], probs[1], brier, method);
            default:
                return heldout::compare(probs[0], probs[1], auc, method);
            }
        };
        const heldout::comparison c = both(heldout::paired::automatic);
        const heldout::comparison naive = both(heldout::paired::naive_t);
        std::printf("  %-20s  %8s  %-18s  %7s  %4s  %8s  %s\n", measure_names[which], fixed(c.difference).c_str(),
                    interval_text(c.lower, c.upper).c_str(), fixed(c.statistic, 2).c_str(),
                    c.df ? fixed(*c.df, 0).c_str() : "-", p_text(c.p_value).c_str(), p_text(naive.p_value).c_str());
        method = c.method_label;
    }
    std::printf("\n  test: %s, two-sided p-values.\n", method.c_str());
    std::printf("\nThe naive p (the paired t over splits, as if they were independent) is shown only to say\n"
                "why it is not used: the splits share training rows, and it rejects far too often.\n");

    heading("5. The cost-optimal threshold");
    std::printf("With c_FP = %s and c_FN = %s, a calibrated model should flag a pump when P(failure) >= %s\n"
                "(Elkan 2001). heldout::cost_optimal_threshold finds the threshold of least cost on the\n"
                "out-of-fold scores of repeat 1 (every pump scored once, by a model that did not see it):\n\n",
                fixed(c_fp, 0).c_str(), fixed(c_fn, 0).c_str(), fixed(cost_threshold, 4).c_str());
    std::printf("  %-22s  %9s  %13s  %6s  %6s  cost at 0.5 / at %s\n", "learner", "threshold", "cost per pump", "TPR",
                "FPR", fixed(cost_threshold, 4).c_str());
    const Eigen::Matrix2d cost2 = costs;
    for (std::size_t m = 0; m < 2; ++m) {
        const heldout::cost_optimal_point c = heldout::cost_optimal_threshold(y, out_of_fold[m], cost2);
        std::printf("  %-22s  %9s  %13s  %6s  %6s  %s / %s\n", names[m].c_str(), fixed(c.threshold, 4).c_str(),
                    fixed(c.expected_cost).c_str(), fixed(c.true_positive_rate, 3).c_str(),
                    fixed(c.false_positive_rate, 3).c_str(), fixed(whole_set(cost, y, out_of_fold[m], 0.5)).c_str(),
                    fixed(whole_set(cost, y, out_of_fold[m], cost_threshold)).c_str());
    }
    std::printf("\nThe least cost found on the same scores it was chosen on is optimistic; the Elkan threshold\n"
                "was fixed in advance, which is why section 3 estimates the cost at that threshold.\n");

    heading("6. Pictures");
    std::filesystem::create_directories(plot_dir);
    const std::filesystem::path dir = std::filesystem::absolute(plot_dir);
    std::vector<std::string> written;
    {
        std::vector<heldout::report::calibration_series> cal;
        for (std::size_t m = 0; m < 2; ++m)
            cal.push_back({names[m], heldout::report::reliability_bins(y, out_of_fold[m], 10)});
        heldout::report::save(heldout::report::calibration_plot(
                                  cal, "Calibration of the out-of-fold probabilities",
                                  "repeat 1 of 10-fold CV, 10 equal-width bins; bars: share of pumps per bin"),
                              (dir / "calibration.svg").string());
        written.push_back("calibration.svg");
    }
    {
        std::vector<heldout::report::roc_series> roc;
        for (std::size_t m = 0; m < 2; ++m)
            roc.push_back(heldout::report::roc_series_of(names[m] + " (AUC " +
                                                             fixed(heldout::evaluate(auc, y, out_of_fold[m]), 3) + ")",
                                                         heldout::roc_points(y, out_of_fold[m])));
        heldout::report::save(heldout::report::roc_plot(roc, "ROC curves of the out-of-fold scores",
                                                        "repeat 1 of 10-fold CV, 1200 pumps"),
                              (dir / "roc.svg").string());
        written.push_back("roc.svg");
    }
    const char* file_stem[] = {"classification_error", "cost_weighted_error", "brier_score", "auc"};
    for (std::size_t which = 0; which < 4; ++which) {
        std::vector<heldout::report::strip_group> groups(2);
        for (std::size_t m = 0; m < 2; ++m) {
            groups[m].name = names[m];
            for (const auto& s : table[m][which].per_split)
                if (s.value)
                    groups[m].values.push_back(*s.value);
        }
        if (groups[0].values.size() != groups[1].values.size())
            continue; // undefined splits differ between the learners: no paired picture
        const std::string file = std::string("folds_") + file_stem[which] + ".svg";
        heldout::report::save(
            heldout::report::strip_plot(groups, {.title = std::string(measure_names[which]) + " per split",
                                                 .value_label = measure_names[which],
                                                 .subtitle = "10 x 10-fold stratified CV; grey "
                                                             "lines join the same split; bars: "
                                                             "means",
                                                 .paired = true}),
            (dir / file).string());
        written.push_back(file);
    }
    std::printf("Written to %s:\n", dir.string().c_str());
    for (const auto& f : written)
        std::printf("  %s\n", f.c_str());
    return 0;
} catch (const std::exception& e) {
    std::fprintf(stderr, "heldout_demo: %s\n", e.what());
    return 1;
}
