# MPI tests (included by tests/CMakeLists.txt when -DCAPGAP_MPI=ON): the
# gtest executables under tests/mpi/ start `mpirun` themselves, so they learn
# its path here. They run on this one machine (shared memory), oversubscribe
# the cores when asked for more ranks than there are, and set OpenMPI's
# run-as-root variables in the child environment so CI containers work.
foreach(_capgap_mpi_test mpi_mpi_run_test mpi_golden_mpi_test)
  if(TARGET ${_capgap_mpi_test})
    target_compile_definitions(${_capgap_mpi_test} PRIVATE
      CAPGAP_MPIEXEC="${MPIEXEC_EXECUTABLE}")
  endif()
endforeach()
