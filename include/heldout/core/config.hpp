// heldout/core/config.hpp — compiler checks, the internal assertion macro, and the brackets
// around third-party includes.
//
//   HELDOUT_ASSERT(i < n);   // our own invariants only; user input is checked with
//                            // heldout::input_error (see core/error.hpp)
//
//   HELDOUT_EXTERNAL_BEGIN
//   #include <Eigen/Core>
//   HELDOUT_EXTERNAL_END
#pragma once

#include <heldout/version.hpp>

#if !defined(__cplusplus) || __cplusplus < 202002L
#error "heldout needs C++20 (link heldout::heldout, which requests cxx_std_20)"
#endif

#include <cassert>

#ifndef HELDOUT_ASSERT
#define HELDOUT_ASSERT(cond) assert(cond)
#endif

// Around our includes of Eigen: users who compile with -Wconversion, -Wsign-conversion,
// -Wshadow or -Wdouble-promotion and reach Eigen through -I rather than -isystem would
// otherwise get Eigen 3.4's own warnings from our headers (52 with g++-12 and 33 with
// clang++-14 for <heldout/heldout.hpp>; none with the brackets; tests/strict.cmake checks
// both ways). The warnings are Eigen's, about Eigen's code, which the user cannot change.
#if defined(__GNUC__)
#define HELDOUT_EXTERNAL_BEGIN                                                                                         \
    _Pragma("GCC diagnostic push") _Pragma("GCC diagnostic ignored \"-Wconversion\"")                                  \
        _Pragma("GCC diagnostic ignored \"-Wsign-conversion\"") _Pragma("GCC diagnostic ignored \"-Wshadow\"")         \
            _Pragma("GCC diagnostic ignored \"-Wdouble-promotion\"")
#define HELDOUT_EXTERNAL_END _Pragma("GCC diagnostic pop")
#else
#define HELDOUT_EXTERNAL_BEGIN
#define HELDOUT_EXTERNAL_END
#endif
