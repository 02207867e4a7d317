// heldout/calibration.hpp — are the probabilities calibrated? The calibration slope and
// intercept (logistic recalibration, Cox 1958), the reliability table with Wilson intervals,
// and Spiegelhalter's z test (docs/calibration.md).
//
//   double b = heldout::evaluate(heldout::measure::calibration_slope{}, y, p);   // ideal 1
//   auto bins = heldout::reliability(y, p, 10);
//   auto z = heldout::spiegelhalter_test(y, p);
#pragma once

#include <heldout/calibration/recalibration.hpp>
#include <heldout/calibration/reliability.hpp>
#include <heldout/calibration/spiegelhalter.hpp>
#include <heldout/measure/distance_from_ideal.hpp>
