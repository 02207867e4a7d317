# One strict-consumer compile (tests/strict.cmake): CXX with FLAGS (a ;-list) on SRC.
# MODE syntax: -fsyntax-only; MODE object: -O2 -c into OUT (the optimiser's warnings too).
# Passes when the compile succeeds without any diagnostic (the flags carry -Werror, and
# anything printed at all fails the test).
get_filename_component(work "${OUT}" DIRECTORY)
file(MAKE_DIRECTORY "${work}")
if(MODE STREQUAL "syntax")
    set(what -fsyntax-only)
else()
    set(what -O2 -c -o "${OUT}")
endif()
execute_process(COMMAND ${LAUNCHER} ${CXX} ${FLAGS} ${what} "${SRC}" RESULT_VARIABLE rc OUTPUT_VARIABLE out
                ERROR_VARIABLE err)
if(NOT rc EQUAL 0 OR NOT "${out}${err}" STREQUAL "")
    list(JOIN FLAGS " " shown)
    message(FATAL_ERROR "${CXX} ${shown} ${what} ${SRC}\nexit code ${rc}:\n${out}${err}")
endif()
message(STATUS "${CXX}: ${SRC} compiles without a warning")
