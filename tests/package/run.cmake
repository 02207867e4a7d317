# Installs heldout into a temporary prefix, then builds and runs two consumers:
# one through find_package(heldout CONFIG REQUIRED), one through add_subdirectory.
file(REMOVE_RECURSE ${WORK_DIR})
file(MAKE_DIRECTORY ${WORK_DIR})
function(run)
    execute_process(COMMAND ${ARGN} RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
    if(NOT rc EQUAL 0)
        message(FATAL_ERROR "failed (${rc}): ${ARGN}\n${out}\n${err}")
    endif()
endfunction()
# The same compiler and flags (e.g. -stdlib=libc++) as the build that runs this test.
set(gen -G ${GENERATOR} -DCMAKE_CXX_COMPILER=${CXX} "-DCMAKE_CXX_FLAGS=${CXX_FLAGS}"
    "-DCMAKE_EXE_LINKER_FLAGS=${LINKER_FLAGS}")
run(${CMAKE_COMMAND} -S ${SOURCE_DIR} -B ${WORK_DIR}/lib ${gen} -DHELDOUT_BUILD_TESTS=OFF
    -DHELDOUT_BUILD_BENCH=OFF -DHELDOUT_BUILD_EXAMPLES=OFF -DHELDOUT_INSTALL=ON)
run(${CMAKE_COMMAND} --install ${WORK_DIR}/lib --prefix ${WORK_DIR}/prefix)
run(${CMAKE_COMMAND} -S ${SOURCE_DIR}/tests/package/consumer -B ${WORK_DIR}/consumer ${gen}
    -DCMAKE_PREFIX_PATH=${WORK_DIR}/prefix)
run(${CMAKE_COMMAND} --build ${WORK_DIR}/consumer)
run(${WORK_DIR}/consumer/consumer)
# The mpi component, when this build has MPI: find_package(heldout CONFIG COMPONENTS mpi).
# The consumer runs as a singleton MPI process (no mpiexec: MPI_Init starts one rank).
if(WITH_MPI)
    run(${CMAKE_COMMAND} -S ${SOURCE_DIR}/tests/package/mpi_consumer -B ${WORK_DIR}/mpi_consumer ${gen}
        -DCMAKE_PREFIX_PATH=${WORK_DIR}/prefix)
    run(${CMAKE_COMMAND} --build ${WORK_DIR}/mpi_consumer)
    run(${CMAKE_COMMAND} -E env OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1
        ${WORK_DIR}/mpi_consumer/mpi_consumer)
endif()
run(${CMAKE_COMMAND} -S ${SOURCE_DIR}/tests/package/subdir -B ${WORK_DIR}/subdir ${gen}
    -DHELDOUT_SOURCE_DIR=${SOURCE_DIR})
run(${CMAKE_COMMAND} --build ${WORK_DIR}/subdir)
run(${WORK_DIR}/subdir/consumer)
if(EXISTS ${WORK_DIR}/subdir/heldout/tests OR EXISTS ${WORK_DIR}/subdir/heldout/bench)
    message(FATAL_ERROR "add_subdirectory(heldout) built heldout's own tests or benchmarks")
endif()
message(STATUS "installed package and add_subdirectory both consumed")
