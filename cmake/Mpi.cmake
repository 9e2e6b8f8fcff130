# Optional MPI build (COILWRIGHT_MPI=ON): coilwright-mpi spreads Monte Carlo builds and the
# search's starts over ranks. The default build and tests need no MPI.
find_package(MPI REQUIRED COMPONENTS CXX)
add_executable(coilwright-mpi ${PROJECT_SOURCE_DIR}/src/mpi/coilwright_mpi.cpp)
target_link_libraries(coilwright-mpi PRIVATE coilwright_core coilwright_warnings MPI::MPI_CXX CLI11::CLI11
                                             nlohmann_json::nlohmann_json)
# Only the C interface is used; Open MPI's deprecated C++ bindings do not compile warning-free.
target_compile_definitions(coilwright-mpi PRIVATE OMPI_SKIP_MPICXX=1 MPICH_SKIP_MPICXX=1)
if(COILWRIGHT_TESTS)
  # Two ranks against one process with the same seed: byte-identical ranked designs and builds.
  find_program(COILWRIGHT_MPIEXEC NAMES mpirun mpiexec REQUIRED)
  add_test(NAME mpi_matches_single_process
    COMMAND bash ${PROJECT_SOURCE_DIR}/tests/mpi/mpi_matches_single_process.sh
            $<TARGET_FILE:coilwright> $<TARGET_FILE:coilwright-mpi> ${COILWRIGHT_MPIEXEC}
            ${PROJECT_SOURCE_DIR} ${CMAKE_CURRENT_BINARY_DIR}/mpi-check)
  set_tests_properties(mpi_matches_single_process PROPERTIES LABELS "mpi" TIMEOUT 600)
endif()
