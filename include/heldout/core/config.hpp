// heldout/core/config.hpp — compiler checks and the internal assertion macro.
//
//   HELDOUT_ASSERT(i < n);   // our own invariants only; user input is checked with
//                            // heldout::input_error (see core/error.hpp)
#pragma once

#include <heldout/version.hpp>

#if !defined(__cplusplus) || __cplusplus < 202002L
#error "heldout needs C++20 (link heldout::heldout, which requests cxx_std_20)"
#endif

#include <cassert>

#ifndef HELDOUT_ASSERT
#define HELDOUT_ASSERT(cond) assert(cond)
#endif
