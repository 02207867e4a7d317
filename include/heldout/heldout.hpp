// heldout/heldout.hpp — everything public in heldout.
//
//   #include <heldout/heldout.hpp>
//   double mse = heldout::evaluate(heldout::measure::mse{}, truth, prediction);
#pragma once

#include <heldout/core.hpp>
#include <heldout/measure/mean_loss.hpp>
