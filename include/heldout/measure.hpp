// heldout/measure.hpp — every outer measure (namespace heldout::measure).
//
//   #include <heldout/measure.hpp>
//   double e = heldout::evaluate(heldout::measure::classification_error{}, truth, labels);
//   double a = heldout::evaluate(heldout::measure::auc{}, truth, scores);
#pragma once

// pointwise: regression and probabilities
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/calibration_error.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/distance_from_ideal.hpp>
#include <heldout/measure/mae.hpp>
#include <heldout/measure/max_absolute_error.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/measure/median_absolute_error.hpp>
#include <heldout/measure/r_squared.hpp>
#include <heldout/measure/rmse.hpp>
// class labels
#include <heldout/measure/balanced_accuracy.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/cohen_kappa.hpp>
#include <heldout/measure/confusion_matrix.hpp>
#include <heldout/measure/cost_weighted_error.hpp>
#include <heldout/measure/mcc.hpp>
#include <heldout/measure/precision_recall.hpp>
// ranking
#include <heldout/measure/auc.hpp>
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/binned_auc.hpp>
#include <heldout/measure/multiclass_auc.hpp>
#include <heldout/measure/partial_auc.hpp>
#include <heldout/measure/ranked_sample.hpp>
#include <heldout/measure/roc_points.hpp>
#include <heldout/measure/threshold.hpp>
#include <heldout/measure/thresholded.hpp>
