// heldout/plan.hpp — every resampling plan, the split range, structure helpers, checks
// and the CSV audit.
//
//   #include <heldout/plan.hpp>
//   for (const heldout::split& s : heldout::kfold{.folds = 10, .seed = 7}.splits(heldout::strata(y))) {
//       fit(s.train); score(s.test);
//   }
//
// Plans: holdout, subsampling, kfold, repeated_kfold, five_by_two, leave_one_out,
// bootstrap, walk_forward, purged_kfold, nested. See docs/plans.md.
#pragma once

#include <heldout/core/split.hpp>
#include <heldout/plan/audit.hpp>
#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/check.hpp>
#include <heldout/plan/five_by_two.hpp>
#include <heldout/plan/holdout.hpp>
#include <heldout/plan/kfold.hpp>
#include <heldout/plan/leave_one_out.hpp>
#include <heldout/plan/nested.hpp>
#include <heldout/plan/purged_kfold.hpp>
#include <heldout/plan/range.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/structure.hpp>
#include <heldout/plan/subsampling.hpp>
#include <heldout/plan/walk_forward.hpp>
