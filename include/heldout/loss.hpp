// heldout/loss.hpp — every inner loss: value, derivative and second derivative in the
// prediction f (zero_one: value only).
//
//   #include <heldout/loss.hpp>
//   heldout::loss::huber h{1.5};
//   double g = h.derivative(y, f);   // a learner's gradient
//   double m = heldout::evaluate(heldout::measure::mean_loss<heldout::loss::huber>{h}, y, f);
#pragma once

#include <heldout/core/loss.hpp>
#include <heldout/loss/absolute.hpp>
#include <heldout/loss/hinge.hpp>
#include <heldout/loss/huber.hpp>
#include <heldout/loss/logistic.hpp>
#include <heldout/loss/pinball.hpp>
#include <heldout/loss/poisson.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/loss/zero_one.hpp>
