// heldout/compare.hpp — paired tests and multiple-comparison tools.
//
//   #include <heldout/compare.hpp>
//   auto c = heldout::compare(agg_a, agg_b, heldout::measure::mse{});   // corrected t over splits
//   auto m = heldout::mcnemar_test(truth, labels_a, labels_b, heldout::mcnemar::mid_p);
//   auto f = heldout::friedman_test(results, heldout::direction::higher_is_better);
//   auto p = heldout::holm_adjust(p_values);
//
// The corrected resampled t itself is heldout::corrected_resampled_t (estimate/corrected_t.hpp),
// the paired bootstrap heldout::paired_bootstrap_percentile / _bca (estimate/bootstrap.hpp),
// the paired DeLong test heldout::delong_test (estimate/delong.hpp); compare() uses all three.
#pragma once

#include <heldout/compare/comparison.hpp>
#include <heldout/compare/five_by_two.hpp>
#include <heldout/compare/friedman.hpp>
#include <heldout/compare/holm.hpp>
#include <heldout/compare/mcnemar.hpp>
