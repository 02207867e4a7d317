// heldout/version.hpp — the library version and the versioned inline namespace.
//
//   #include <heldout/version.hpp>
//   static_assert(HELDOUT_VERSION >= 1000);   // 0.1.0 -> 1000
//
// Every public name lives in heldout::v0 (an inline namespace), so two incompatible
// major versions linked into one program fail to link instead of mixing silently.
#pragma once

#define HELDOUT_VERSION_MAJOR 0
#define HELDOUT_VERSION_MINOR 1
#define HELDOUT_VERSION_PATCH 0
#define HELDOUT_VERSION (HELDOUT_VERSION_MAJOR * 10000 + HELDOUT_VERSION_MINOR * 100 + HELDOUT_VERSION_PATCH)

#define HELDOUT_NAMESPACE_BEGIN                                                                                        \
    namespace heldout {                                                                                                \
    inline namespace v0 {
#define HELDOUT_NAMESPACE_END                                                                                          \
    }                                                                                                                  \
    }
