// heldout/slices.hpp — subgroups: one estimate per slice of the test rows, each compared with
// the rest, Holm-adjusted, with the too-small rule and the worst-slice note (docs/slices.md).
//
//   for (const auto& r : heldout::estimate_slices(agg, heldout::measure::auc{}, region, {}))
//       std::cout << r << '\n';
#pragma once

#include <heldout/slices/estimate_slices.hpp>
