// A seeded scenario with every section of the HTML report in it: a risk per row, 0/1 outcomes
// drawn from it, and three scorers that see the risk with more or less noise (the stump only
// its side of 0.5), each recorded (Brier score and AUC, predictions kept) over a repeated
// k-fold plan. Shared by tests/report/html.cpp and tests/browser/write_report.cpp.
#pragma once

#include <heldout/core/random.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/plan/repeated_kfold.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

namespace heldout_test {

struct three_scorers {
    std::vector<std::uint8_t> y;
    std::vector<std::vector<double>> p;
    std::vector<heldout::aggregator> aggs;
    std::vector<std::string> names{"logistic <IRLS>", "k-NN", "stump"};

    three_scorers(std::size_t rows, std::uint64_t data_seed, heldout::repeated_kfold plan) : p(3) {
        heldout::rng g(data_seed);
        for (std::size_t i = 0; i < rows; ++i) {
            const double risk = g.uniform();
            y.push_back(static_cast<std::uint8_t>(g.uniform() < risk));
            p[0].push_back(std::clamp(risk + 0.2 * (g.uniform() - 0.5), 0.0, 1.0));
            p[1].push_back(std::clamp(risk + 0.5 * (g.uniform() - 0.5), 0.0, 1.0));
            p[2].push_back(risk > 0.5 ? 0.7 : 0.3);
        }
        for (std::size_t m = 0; m < 3; ++m) {
            aggs.emplace_back(heldout::measure::brier_score{}, heldout::measure::auc{});
            aggs.back().set_model(names[m]);
        }
        for (const heldout::split& s : plan.splits(y.size())) {
            std::vector<std::uint8_t> t;
            for (const std::size_t r : s.test)
                t.push_back(y[r]);
            for (std::size_t m = 0; m < 3; ++m) {
                std::vector<double> q;
                for (const std::size_t r : s.test)
                    q.push_back(p[m][r]);
                aggs[m].record(s, t, q);
            }
        }
    }
};

} // namespace heldout_test
