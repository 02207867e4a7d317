// heldout/heldout.hpp — everything public in heldout.
//
//   #include <heldout/heldout.hpp>
//   double mse = heldout::evaluate(heldout::measure::mse{}, truth, prediction);
//   for (const heldout::split& s : heldout::kfold{.folds = 10, .seed = 7}.splits(n)) { ... }
#pragma once

#include <heldout/calibration.hpp>
#include <heldout/censored.hpp>
#include <heldout/compare.hpp>
#include <heldout/core.hpp>
#include <heldout/estimate.hpp>
#include <heldout/loss.hpp>
#include <heldout/measure.hpp>
#include <heldout/plan.hpp>
#include <heldout/query.hpp>
#include <heldout/report.hpp>
#include <heldout/slices.hpp>
#include <heldout/stream.hpp>
