// heldout/estimate/predictions_csv.hpp — the out-of-fold predictions of several models, recorded
// on the same splits, as one CSV file in the wide layout the `heldout` tool reads: one row per
// test row of each split, one column per model (one per class and model for class
// probabilities).
//
//   heldout::aggregator a(heldout::measure::auc{}), b(heldout::measure::auc{});
//   a.set_model("logistic");
//   b.set_model("knn");
//   ... record the same splits in both ...
//   std::ofstream f("predictions.csv");
//   heldout::write_predictions_csv(f, std::vector<heldout::aggregator>{a, b});
//   // split,repeat,fold,row,truth,logistic,knn
//   // 0,0,0,17,1,0.83,0.8
//   // ...
//   // then: heldout predictions.csv --truth truth --score logistic --score knn --split split --folds 10
//
// Columns: split (the split's index), repeat, fold, row (the row number in the data), truth,
// then per model its predictions, named after the model (aggregator::set_model; unnamed models
// are "model 1", "model 2", ...): one column NAME for values, labels or scores, or NAME:0 ..
// NAME:(k-1) for class-probability rows. Numbers are written in shortest round-trip form;
// names are quoted per RFC 4180 when needed. The models must have recorded the same splits
// (the same test rows, in the same order) with the same truth, and kept their predictions;
// input_error names the first model, split and row that differ.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/estimate.hpp>

#include <algorithm>
#include <cstddef>
#include <ostream>
#include <span>
#include <sstream>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Writes the kept out-of-fold predictions of several models in the wide layout (see above).
inline void write_predictions_csv(std::ostream& os, std::span<const aggregator> models) {
    constexpr std::string_view who = "heldout::write_predictions_csv";
    if (models.empty())
        detail::fail(who, "models", "empty input");
    const aggregator& first = models[0];
    std::vector<std::string> names;
    for (std::size_t m = 0; m < models.size(); ++m) {
        const aggregator& a = models[m];
        const std::string arg = "models[" + std::to_string(m) + "]";
        if (!a.keeps_predictions())
            detail::fail(who, arg, "predictions were not kept");
        if (a.empty())
            detail::fail(who, arg, "no splits recorded");
        if (a.size() != first.size())
            detail::fail(who, arg,
                         std::to_string(a.size()) + " splits recorded, model 0 has " + std::to_string(first.size()));
        for (std::size_t i = 0; i < a.size(); ++i) {
            const auto ra = a.test_rows(i), r0 = first.test_rows(i);
            if (ra.size() != r0.size() || !std::equal(ra.begin(), ra.end(), r0.begin()))
                detail::fail(who, arg, "split " + std::to_string(i) + " has other test rows than in model 0");
        }
        names.push_back(a.model().empty() ? "model " + std::to_string(m + 1) : a.model());
        for (std::size_t j = 0; j < m; ++j)
            if (names[j] == names[m])
                detail::fail(who, arg, "model name '" + names[m] + "' repeats models[" + std::to_string(j) + "]");
    }
    const auto* truth0 = detail::aggregator_access::truth(first);
    auto cell_text = [](const detail::column_base& c, std::size_t k, std::size_t j) {
        std::ostringstream s;
        c.write_cell(s, k, j);
        return s.str();
    };
    os << "split,repeat,fold,row,truth";
    for (std::size_t m = 0; m < models.size(); ++m) {
        const std::size_t cells = detail::aggregator_access::predictions(models[m])->cells();
        if (cells > 1)
            for (std::size_t j = 0; j < cells; ++j)
                os << ',' << detail::csv_field(names[m] + ":" + std::to_string(j));
        else
            os << ',' << detail::csv_field(names[m]);
    }
    os << '\n';
    for (std::size_t i = 0; i < first.size(); ++i) {
        const split_record& s = first.splits()[i];
        const auto rows = first.test_rows(i);
        for (std::size_t r = 0; r < rows.size(); ++r) {
            const std::size_t k = s.offset + r; // the row's place in the kept columns
            std::string truth;
            for (std::size_t j = 0; j < truth0->cells(); ++j)
                truth += (j ? "," : "") + cell_text(*truth0, k, j);
            for (std::size_t m = 1; m < models.size(); ++m) {
                const auto* t = detail::aggregator_access::truth(models[m]);
                std::string other;
                for (std::size_t j = 0; j < t->cells(); ++j)
                    other += (j ? "," : "") + cell_text(*t, k, j);
                if (other != truth)
                    detail::fail(who, "models[" + std::to_string(m) + "]",
                                 "truth of row " + std::to_string(rows[r]) + " in split " + std::to_string(i) + " is " +
                                     other + ", model 0 recorded " + truth);
            }
            os << s.index << ',' << s.repeat << ',' << s.fold << ',' << rows[r] << ',' << truth;
            for (const auto& a : models) {
                const auto* p = detail::aggregator_access::predictions(a);
                for (std::size_t j = 0; j < p->cells(); ++j)
                    os << ',' << cell_text(*p, k, j);
            }
            os << '\n';
        }
    }
}

HELDOUT_NAMESPACE_END
