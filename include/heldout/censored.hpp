// heldout/censored.hpp — time-to-event models: the censored truth, the censoring estimate,
// Harrell's and Uno's C, time-dependent AUC, IPCW Brier scores, and C-index intervals and
// paired comparisons (docs/censored.md).
//
//   auto truth = heldout::censored(time, event);
//   double c = heldout::evaluate(heldout::measure::harrell_c{}, truth, risk);
//   auto e = heldout::concordance_estimate(heldout::measure::uno_c{.horizon = 5}, truth, risk, 0.95);
#pragma once

#include <heldout/censored/auc_at.hpp>
#include <heldout/censored/brier.hpp>
#include <heldout/censored/censoring_estimate.hpp>
#include <heldout/censored/column.hpp>
#include <heldout/censored/concordance_estimate.hpp>
#include <heldout/censored/harrell_c.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/censored/uno_c.hpp>
