# heldout::mpi (label mpi): tests/mpi/*.cpp are MPI programs, each run under mpiexec with 1, 2,
# 3 and 4 ranks; a program prints "heldout::mpi checks passed" on rank 0 when every check held
# on every rank. Open MPI gets --oversubscribe (more ranks than cores) and, when configured as
# root (CI containers), --allow-run-as-root. Without MPI the tests say SKIPPED (code 77).
file(GLOB HELDOUT_MPI_TESTS CONFIGURE_DEPENDS ${CMAKE_CURRENT_SOURCE_DIR}/mpi/*.cpp)
heldout_only(HELDOUT_MPI_TESTS)
if(NOT HELDOUT_MPI_TESTS)
    return()
endif()
set(heldout_mpiexec "${MPIEXEC_EXECUTABLE}")
if(TARGET heldout::mpi AND heldout_mpiexec)
    set(heldout_mpiexec_flags)
    execute_process(COMMAND ${heldout_mpiexec} --version OUTPUT_VARIABLE mpiexec_version ERROR_QUIET)
    if(mpiexec_version MATCHES "Open MPI|OpenRTE")
        list(APPEND heldout_mpiexec_flags --oversubscribe)
        execute_process(COMMAND id -u OUTPUT_VARIABLE uid OUTPUT_STRIP_TRAILING_WHITESPACE ERROR_QUIET)
        if(uid STREQUAL "0")
            list(APPEND heldout_mpiexec_flags --allow-run-as-root)
        endif()
    endif()
    # <heldout/mpi.hpp> compiles on its own.
    file(CONFIGURE OUTPUT ${CMAKE_CURRENT_BINARY_DIR}/headers/heldout_mpi_hpp.cpp
         CONTENT "#include <heldout/mpi.hpp>\n#include <heldout/mpi.hpp> // include guard\n")
    add_library(heldout_mpi_header_check OBJECT ${CMAKE_CURRENT_BINARY_DIR}/headers/heldout_mpi_hpp.cpp)
    target_link_libraries(heldout_mpi_header_check PRIVATE heldout::mpi)
    heldout_dev_target(heldout_mpi_header_check)
    foreach(src IN LISTS HELDOUT_MPI_TESTS)
        get_filename_component(name ${src} NAME_WE)
        add_executable(heldout_mpi_${name} ${src})
        target_link_libraries(heldout_mpi_${name} PRIVATE heldout::mpi)
        heldout_dev_target(heldout_mpi_${name})
        foreach(np 1 2 3 4)
            add_test(NAME mpi.${name}.ranks${np}
                     COMMAND ${heldout_mpiexec} ${MPIEXEC_NUMPROC_FLAG} ${np} ${heldout_mpiexec_flags}
                             $<TARGET_FILE:heldout_mpi_${name}>)
            # Leak checks off: the MPI runtime keeps allocations until exit.
            set_tests_properties(mpi.${name}.ranks${np} PROPERTIES LABELS mpi TIMEOUT 300
                                 PASS_REGULAR_EXPRESSION "heldout::mpi checks passed"
                                 ENVIRONMENT "ASAN_OPTIONS=detect_leaks=0")
        endforeach()
    endforeach()
else()
    message(STATUS "heldout: the heldout::mpi tests will say SKIPPED (MPI for C++ or mpiexec not found: "
                   "install openmpi-bin libopenmpi-dev)")
    foreach(src IN LISTS HELDOUT_MPI_TESTS)
        get_filename_component(name ${src} NAME_WE)
        foreach(np 1 2 3 4)
            add_test(NAME mpi.${name}.ranks${np} COMMAND sh -c "echo 'SKIPPED: no MPI'; exit 77")
            set_tests_properties(mpi.${name}.ranks${np} PROPERTIES LABELS mpi SKIP_RETURN_CODE 77)
        endforeach()
    endforeach()
endif()
