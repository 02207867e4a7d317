// heldout/estimate.hpp — from per-split results to estimates with honest intervals.
//
//   #include <heldout/estimate.hpp>
//   auto agg = heldout::evaluate_splits(plan.splits(heldout::strata(y)), y, fit_predict,
//                                       heldout::measure::classification_error{});
//   std::cout << agg.estimate(heldout::measure::classification_error{}) << '\n';
//   auto w = heldout::wilson_interval(errors, n, 0.95);
#pragma once

#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/bootstrap_632.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/estimate/nested_cv.hpp>
#include <heldout/estimate/predictions_csv.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/estimate/tuning.hpp>
