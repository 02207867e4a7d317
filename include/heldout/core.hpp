// heldout/core.hpp — the concepts and vocabulary every other part builds on.
//
//   #include <heldout/core.hpp>
//   static_assert(heldout::outer_measure<heldout::measure::mse>);
#pragma once

#include <heldout/core/capabilities.hpp>
#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/loss.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/random.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/core/values.hpp>
