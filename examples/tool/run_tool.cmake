cmake_minimum_required(VERSION 3.21)
# One end-to-end case of the heldout tool (registered by examples/tool/CMakeLists.txt):
# runs TOOL with ARGS ('|'-separated; {DATA} and {WORK} replaced), checks the exit code
# (CODE), that stdout + stderr match EXPECT (a regex), and with JSON=ON that the output is
# JSON whose numbers agree with scipy (check_json.py, run by PYTHON).
# Optional: SETUP=ON runs make_cases.py {WORK} first (edge-case CSV files into WORK);
# TASKS=ON runs make_tasks.py {WORK} (a file of every task into WORK); LIBRARY=ON runs
# CHECKER (check_library: the library's free functions) with the same ARGS and has
# check_library.py compare its values with the tool's JSON; TERMINAL=ON runs the tool under
# `script` so that its standard error is a terminal (the progress line must show there, and
# only there); REPORT=ON checks the --report file ({WORK}/report.html) is one self-contained
# HTML page (check_report.py);
# STDIN=file feeds the tool's standard input from a file; STDOUT=file sends its standard
# output there instead of capturing it (e.g. /dev/full, a device that refuses every write).
string(REPLACE "|" ";" args "${ARGS}")
string(REPLACE "{DATA}" "${DATA}" args "${args}")
string(REPLACE "{WORK}" "${WORK}" args "${args}")
file(REMOVE_RECURSE ${WORK})
file(MAKE_DIRECTORY ${WORK})
if(SETUP)
    execute_process(COMMAND ${PYTHON} ${CMAKE_CURRENT_LIST_DIR}/make_cases.py ${WORK} RESULT_VARIABLE src
                    ERROR_VARIABLE serr)
    if(NOT src EQUAL 0)
        message(FATAL_ERROR "make_cases.py failed:\n${serr}")
    endif()
endif()
if(TASKS)
    execute_process(COMMAND ${PYTHON} ${CMAKE_CURRENT_LIST_DIR}/make_tasks.py ${WORK} RESULT_VARIABLE src
                    ERROR_VARIABLE serr)
    if(NOT src EQUAL 0)
        message(FATAL_ERROR "make_tasks.py failed:\n${serr}")
    endif()
endif()
if(TERMINAL)
    # `script` gives the tool a pseudo-terminal for its standard streams: the progress line
    # (carriage returns on standard error) must appear; the same run piped shows none.
    string(REPLACE ";" " " line "${args}")
    execute_process(COMMAND script -qec "${TOOL} ${line} >/dev/null" /dev/null RESULT_VARIABLE rc
                    OUTPUT_VARIABLE tty ERROR_VARIABLE tty_err)
    if(NOT rc EQUAL CODE OR NOT "${tty}" MATCHES "heldout: [0-9]+/[0-9]+ ")
        message(FATAL_ERROR "on a terminal: exit ${rc}, no progress line in:\n${tty}${tty_err}")
    endif()
    execute_process(COMMAND ${TOOL} ${args} RESULT_VARIABLE rc OUTPUT_QUIET ERROR_VARIABLE piped)
    if(NOT "${piped}" STREQUAL "")
        message(FATAL_ERROR "standard error piped: expected nothing, got:\n${piped}")
    endif()
    message(STATUS "progress line on a terminal, nothing when piped")
endif()
string(REPLACE "{DATA}" "${DATA}" STDIN "${STDIN}")
string(REPLACE "{WORK}" "${WORK}" STDIN "${STDIN}")
set(redirect)
if(STDIN)
    list(APPEND redirect INPUT_FILE ${STDIN})
endif()
if(STDOUT)
    list(APPEND redirect OUTPUT_FILE ${STDOUT})
else()
    list(APPEND redirect OUTPUT_VARIABLE out)
endif()
execute_process(COMMAND ${TOOL} ${args} RESULT_VARIABLE rc ERROR_VARIABLE err ${redirect})
if(NOT rc EQUAL CODE)
    message(FATAL_ERROR "exit code ${rc}, expected ${CODE}\nstdout:\n${out}\nstderr:\n${err}")
endif()
if(NOT "${out}${err}" MATCHES "${EXPECT}")
    message(FATAL_ERROR "output does not match '${EXPECT}'\nstdout:\n${out}\nstderr:\n${err}")
endif()
if(JSON)
    file(WRITE ${WORK}/out.json "${out}")
    execute_process(COMMAND ${PYTHON} ${CMAKE_CURRENT_LIST_DIR}/check_json.py ${WORK}/out.json ${args}
                    RESULT_VARIABLE prc OUTPUT_VARIABLE pout ERROR_VARIABLE perr)
    if(NOT prc EQUAL 0)
        message(FATAL_ERROR "JSON check failed:\n${pout}\n${perr}\noutput:\n${out}")
    endif()
    message(STATUS "${pout}")
endif()
if(LIBRARY)
    file(WRITE ${WORK}/out.json "${out}")
    execute_process(COMMAND ${CHECKER} ${args} OUTPUT_FILE ${WORK}/library.jsonl RESULT_VARIABLE crc
                    ERROR_VARIABLE cerr)
    if(NOT crc EQUAL 0)
        message(FATAL_ERROR "check_library failed:\n${cerr}")
    endif()
    execute_process(COMMAND ${PYTHON} ${CMAKE_CURRENT_LIST_DIR}/check_library.py ${WORK}/out.json
                            ${WORK}/library.jsonl RESULT_VARIABLE prc OUTPUT_VARIABLE pout ERROR_VARIABLE perr)
    if(NOT prc EQUAL 0)
        message(FATAL_ERROR "the tool and the library differ:\n${pout}\n${perr}\noutput:\n${out}")
    endif()
    message(STATUS "${pout}")
endif()
if(REPORT)
    execute_process(COMMAND ${PYTHON} ${CMAKE_CURRENT_LIST_DIR}/check_report.py ${WORK}/report.html
                    RESULT_VARIABLE prc OUTPUT_VARIABLE pout ERROR_VARIABLE perr)
    if(NOT prc EQUAL 0)
        message(FATAL_ERROR "report check failed:\n${pout}\n${perr}")
    endif()
    message(STATUS "${pout}")
endif()
file(GLOB svgs ${WORK}/plots/*.svg)
if(svgs)
    execute_process(COMMAND ${PYTHON} -c "import sys, xml.etree.ElementTree as ET\nfor f in sys.argv[1:]:\n    assert ET.parse(f).getroot().tag == '{http://www.w3.org/2000/svg}svg', f\nprint(len(sys.argv) - 1, 'SVG files parse')"
                            ${svgs} RESULT_VARIABLE prc OUTPUT_VARIABLE pout ERROR_VARIABLE perr)
    if(NOT prc EQUAL 0)
        message(FATAL_ERROR "an SVG is not well-formed XML:\n${perr}")
    endif()
    message(STATUS "${pout}")
endif()
message(STATUS "${out}${err}")
