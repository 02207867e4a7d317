// heldout/planning.hpp — test-set planning: how many test rows are needed to know an error
// rate or an AUC to a given precision, or to detect a difference of two classifiers' error
// rates with McNemar's test (docs/planning.md).
//
//   std::uint64_t n = heldout::test_rows_for_proportion(0.1, 0.02, 0.95);   // 868 rows
#pragma once

#include <heldout/planning/test_rows.hpp>
