// heldout/measure/mae.hpp — mean absolute error: mean_loss<loss::absolute>.
//
//   double m = heldout::evaluate(heldout::measure::mae{}, y, f);      // mean |y - f|
//   double w = heldout::evaluate(heldout::measure::mae{}, y, f, wts); // sum w |y - f| / sum w
//
// One fused, vectorised pass with compensated block sums (see measure/mean_loss.hpp).
#pragma once

#include <heldout/loss/absolute.hpp>
#include <heldout/measure/mean_loss.hpp>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Mean absolute error: mean_loss<loss::absolute> itself.
using mae = mean_loss<loss::absolute>;

} // namespace measure
HELDOUT_NAMESPACE_END
