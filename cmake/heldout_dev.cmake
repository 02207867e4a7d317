# Settings for heldout's own targets (tests, benchmarks, examples) — never for users.
# heldout_dev_target(t) adds warnings (-Werror with HELDOUT_WERROR) and sanitizers
# (HELDOUT_SANITIZE) to target t.
function(heldout_dev_target target)
    if(CMAKE_CXX_COMPILER_ID MATCHES "GNU|Clang")
        target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic)
        if(HELDOUT_WERROR)
            target_compile_options(${target} PRIVATE -Werror)
        endif()
        # ccache caches translation units that use a precompiled header only when clang leaves
        # the build time out of it (and CCACHE_SLOPPINESS has pch_defines,time_macros; .ci/run)
        if(CMAKE_CXX_COMPILER_ID STREQUAL "Clang" AND CMAKE_CXX_COMPILER_LAUNCHER MATCHES "ccache")
            target_compile_options(${target} PRIVATE -Xclang -fno-pch-timestamp)
        endif()
        if(HELDOUT_SANITIZE)
            target_compile_options(${target} PRIVATE -fsanitize=address,undefined -fno-sanitize-recover=all
                                                     -fno-omit-frame-pointer)
            target_link_options(${target} PRIVATE -fsanitize=address,undefined -fno-sanitize-recover=all)
        endif()
    endif()
endfunction()

# Python with scipy for the live reference checks (Debian's, not whatever is on PATH).
set(HELDOUT_PYTHON "/usr/bin/python3" CACHE FILEPATH "Python interpreter with numpy and scipy")

# heldout_only(list) keeps the entries of list that match HELDOUT_ONLY (all when it is empty),
# so that one developer's work in progress does not break another's build.
macro(heldout_only var)
    if(NOT "${HELDOUT_ONLY}" STREQUAL "")
        list(FILTER ${var} INCLUDE REGEX "${HELDOUT_ONLY}")
    endif()
endmacro()
