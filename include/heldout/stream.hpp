// heldout/stream.hpp — inside the training loop and beyond one machine: early stopping,
// multi-threaded evaluation with a thread-count-independent result, and portable
// accumulator state for merging shards.
//
//   heldout::early_stopping stop{heldout::measure::mse{}, {.patience = 3}};
//   double v = heldout::evaluate_parallel(heldout::measure::mse{}, y, f, {.threads = 2});
//   auto bytes = heldout::serialize(acc);
#pragma once

#include <heldout/stream/early_stopping.hpp>
#include <heldout/stream/parallel.hpp>
#include <heldout/stream/serialize.hpp>
