# Strict consumers (label `strict`): users compile heldout's headers with their own warning
# flags, and Eigen and Boost come in as system headers (-isystem, as CMake does for imported
# targets). With the build's own compiler and flags (g++ in the dev preset, clang++ with
# libc++ in the libcxx preset: CI runs both):
#   strict.umbrella      tests/strict/umbrella.cpp: <heldout/heldout.hpp>, an empty main
#   strict.umbrella_plain_eigen  the same with Eigen through -I, as a user compiling by hand
#   strict.instantiate   tests/strict/instantiate.cpp: a representative part of heldout
#                        instantiated, so that warnings inside templates show up; with g++ at
#                        -O2, since its flow-based warnings (-Wmaybe-uninitialized, ...) need
#                        the optimiser (clang's warnings all come from the front end)
# under -Wall -Wextra -Wpedantic -Wconversion -Wsign-conversion -Wshadow -Wdouble-promotion
# -Werror; any diagnostic fails. strict.number_text builds tests/strict/number_text.cpp with
# g++ (libstdc++) and clang++ (libc++) and requires the same number texts from both (SKIPPED
# when either is missing).
get_target_property(strict_eigen Eigen3::Eigen INTERFACE_INCLUDE_DIRECTORIES)
set(strict_includes -I${PROJECT_SOURCE_DIR}/include)
foreach(dir IN LISTS strict_eigen Boost_INCLUDE_DIRS)
    # as CMake does: never the compiler's own directories (-isystem /usr/include breaks
    # the standard library's #include_next)
    if(NOT dir IN_LIST CMAKE_CXX_IMPLICIT_INCLUDE_DIRECTORIES AND NOT dir STREQUAL "/usr/include")
        list(APPEND strict_includes -isystem ${dir})
    endif()
endforeach()
# The same consumer compiling by hand, with Eigen through -I: Eigen's own warnings must not
# reach it through our headers either (core/config.hpp, HELDOUT_EXTERNAL_BEGIN).
set(plain_includes -I${PROJECT_SOURCE_DIR}/include)
foreach(dir IN LISTS strict_eigen)
    if(NOT dir IN_LIST CMAKE_CXX_IMPLICIT_INCLUDE_DIRECTORIES AND NOT dir STREQUAL "/usr/include")
        list(APPEND plain_includes -I${dir})
    endif()
endforeach()
set(strict_work ${CMAKE_CURRENT_BINARY_DIR}/strict)

if(CMAKE_CXX_COMPILER_ID MATCHES "GNU|Clang")
    separate_arguments(strict_build_flags UNIX_COMMAND "${CMAKE_CXX_FLAGS}") # e.g. -stdlib=libc++
    set(strict_flags ${strict_build_flags} -std=c++20 -Wall -Wextra -Wpedantic -Wconversion -Wsign-conversion
                     -Wshadow -Wdouble-promotion -Werror ${strict_includes})
    string(REPLACE ";" "$<SEMICOLON>" strict_flags "${strict_flags}")
    foreach(tu umbrella instantiate)
        set(mode syntax)
        if(tu STREQUAL "instantiate" AND CMAKE_CXX_COMPILER_ID STREQUAL "GNU")
            set(mode object)
        endif()
        add_test(NAME strict.${tu}
                 COMMAND ${CMAKE_COMMAND} -DCXX=${CMAKE_CXX_COMPILER} "-DFLAGS=${strict_flags}" -DMODE=${mode}
                         "-DLAUNCHER=${CMAKE_CXX_COMPILER_LAUNCHER}" -DSRC=${CMAKE_CURRENT_SOURCE_DIR}/strict/${tu}.cpp
                         -DOUT=${strict_work}/${tu}/${tu}.o -P ${CMAKE_CURRENT_SOURCE_DIR}/strict/check.cmake)
        set_tests_properties(strict.${tu} PROPERTIES LABELS strict TIMEOUT 900)
    endforeach()
    set(plain_flags ${strict_build_flags} -std=c++20 -Wall -Wextra -Wpedantic -Wconversion -Wsign-conversion
                    -Wshadow -Wdouble-promotion -Werror ${plain_includes})
    string(REPLACE ";" "$<SEMICOLON>" plain_flags "${plain_flags}")
    add_test(NAME strict.umbrella_plain_eigen
             COMMAND ${CMAKE_COMMAND} -DCXX=${CMAKE_CXX_COMPILER} "-DFLAGS=${plain_flags}" -DMODE=syntax
                     "-DLAUNCHER=${CMAKE_CXX_COMPILER_LAUNCHER}" -DSRC=${CMAKE_CURRENT_SOURCE_DIR}/strict/umbrella.cpp
                     -DOUT=${strict_work}/umbrella_plain_eigen/umbrella.o -P ${CMAKE_CURRENT_SOURCE_DIR}/strict/check.cmake)
    set_tests_properties(strict.umbrella_plain_eigen PROPERTIES LABELS strict TIMEOUT 900)
endif()

find_program(HELDOUT_STRICT_GXX NAMES g++-12 g++)
find_program(HELDOUT_STRICT_CLANGXX NAMES clang++-14 clang++)
string(REPLACE ";" "$<SEMICOLON>" flags_a "-std=c++20;${strict_includes}")
string(REPLACE ";" "$<SEMICOLON>" flags_b "-stdlib=libc++;-std=c++20;${strict_includes}")
add_test(NAME strict.number_text
         COMMAND ${CMAKE_COMMAND} "-DCXX_A=${HELDOUT_STRICT_GXX}" -DNAME_A=g++/libstdc++ "-DFLAGS_A=${flags_a}"
                 "-DCXX_B=${HELDOUT_STRICT_CLANGXX}" -DNAME_B=clang++/libc++ "-DFLAGS_B=${flags_b}"
                 "-DLAUNCHER=${CMAKE_CXX_COMPILER_LAUNCHER}" -DSRC=${CMAKE_CURRENT_SOURCE_DIR}/strict/number_text.cpp
                 -DWORK=${strict_work}/number_text -P ${CMAKE_CURRENT_SOURCE_DIR}/strict/same_text.cmake)
set_tests_properties(strict.number_text PROPERTIES LABELS strict SKIP_REGULAR_EXPRESSION "SKIPPED:" TIMEOUT 900)
