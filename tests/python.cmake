# Python read-back tests of the capgap-curves HDF5 format (included by
# tests/CMakeLists.txt). They need a Python 3 with h5py, matplotlib and numpy:
# CAPGAP_PYTHON defaults to Debian's /usr/bin/python3 when it can import them
# (a python3 earlier on PATH, e.g. pyenv's, usually cannot), else to whatever
# find_program(python3) finds. Tests carry the label `python`
# (ctest -L python). Scripts live in tests/python/ and analysis/plot_curves.py.

if(NOT CAPGAP_PYTHON)
  set(_capgap_python_default "")
  if(EXISTS /usr/bin/python3)
    execute_process(COMMAND /usr/bin/python3 -c "import h5py, matplotlib, numpy"
      RESULT_VARIABLE _capgap_python_rc OUTPUT_QUIET ERROR_QUIET)
    if(_capgap_python_rc EQUAL 0)
      set(_capgap_python_default /usr/bin/python3)
    endif()
  endif()
  if(NOT _capgap_python_default)
    find_program(_capgap_python_found NAMES python3)
    if(_capgap_python_found)
      set(_capgap_python_default ${_capgap_python_found})
    endif()
  endif()
  set(CAPGAP_PYTHON "${_capgap_python_default}" CACHE FILEPATH
    "Python 3 with h5py, matplotlib and numpy for the python-labelled tests")
endif()

if(NOT CAPGAP_PYTHON)
  message(STATUS "capgap: no python3 found; python tests not registered")
  return()
endif()
execute_process(COMMAND ${CAPGAP_PYTHON} -c "import h5py, matplotlib, numpy"
  RESULT_VARIABLE _capgap_python_rc OUTPUT_QUIET ERROR_QUIET)
if(NOT _capgap_python_rc EQUAL 0)
  message(WARNING "capgap: ${CAPGAP_PYTHON} cannot import h5py, matplotlib and numpy; "
    "the python tests will fail. Set -DCAPGAP_PYTHON=/usr/bin/python3 (Debian: "
    "python3-h5py python3-matplotlib python3-numpy).")
else()
  message(STATUS "capgap: python tests use ${CAPGAP_PYTHON}")
endif()

set(_capgap_py_dir ${CMAKE_SOURCE_DIR}/tests/python)
set(_capgap_py_work ${CMAKE_CURRENT_BINARY_DIR}/python)
file(MAKE_DIRECTORY ${_capgap_py_work})
# Keep the source tree free of __pycache__ and matplotlib's caches out of $HOME.
set(_capgap_py_env "PYTHONDONTWRITEBYTECODE=1;MPLBACKEND=Agg;MPLCONFIGDIR=${_capgap_py_work}/mplconfig")

# (a) The layout checker rejects broken files (and accepts the good one).
add_test(NAME python_checker_rejects_broken_files
  COMMAND ${CAPGAP_PYTHON} -B ${_capgap_py_dir}/test_checker_rejects.py
          --workdir ${_capgap_py_work}/checker_rejects
  WORKING_DIRECTORY ${_capgap_py_work})

# (b) Plot a synthetic file; PNG and SVG must exist, be non-empty and valid;
#     bad inputs must be refused with a clear message.
add_test(NAME python_plot_fake_file
  COMMAND ${CAPGAP_PYTHON} -B ${_capgap_py_dir}/plot_fake_and_check.py
          --workdir ${_capgap_py_work}/plot_fake
          --plotter ${CMAKE_SOURCE_DIR}/analysis/plot_curves.py
          --maker ${_capgap_py_dir}/make_fake_h5.py
  WORKING_DIRECTORY ${_capgap_py_work})

# (c) A real run of the CLI on configs/ci_tiny.ini, its layout check and plot.
#     Fails until the CLI and that config exist.
add_test(NAME python_h5_layout_of_real_run
  COMMAND ${CAPGAP_PYTHON} -B ${_capgap_py_dir}/run_and_check.py
          --capgap ${CMAKE_BINARY_DIR}/capgap
          --config ${CMAKE_SOURCE_DIR}/configs/ci_tiny.ini
          --out ${CMAKE_BINARY_DIR}/tests/ci_tiny.h5
          --checker ${_capgap_py_dir}/check_h5_layout.py
          --plotter ${CMAKE_SOURCE_DIR}/analysis/plot_curves.py
  WORKING_DIRECTORY ${_capgap_py_work})

# (c2) A short LDPC code (configs/qpsk_ldpc_peg_n128_r1-2.ini, cut down to
#      three points stopping on frame errors): the finite-length limits group
#      is checked (the NA recomputed with numpy) and drawn in the FER panel.
add_test(NAME python_finite_length_run
  COMMAND ${CAPGAP_PYTHON} -B ${_capgap_py_dir}/run_and_check.py
          --capgap ${CMAKE_BINARY_DIR}/capgap
          --config ${CMAKE_SOURCE_DIR}/configs/qpsk_ldpc_peg_n128_r1-2.ini
          --out ${CMAKE_BINARY_DIR}/tests/finite_length_n128.h5
          --checker ${_capgap_py_dir}/check_h5_layout.py
          --plotter ${CMAKE_SOURCE_DIR}/analysis/plot_curves.py
          --set "sweep.ebno_db=2 to 4 by 1" --set sweep.stop_frame_errors=30
          --set sweep.stop_bits=2000000
  WORKING_DIRECTORY ${_capgap_py_work})
set_tests_properties(python_finite_length_run
  PROPERTIES LABELS python ENVIRONMENT "${_capgap_py_env}" TIMEOUT 600)

# (d) A fading scheme's file (written by tests/sim/io/fading_curves_test.cc):
#     layout check with the fading theory, and the plots with the ergodic and
#     outage limits.
add_test(NAME python_fading_file
  COMMAND ${CAPGAP_PYTHON} -B ${_capgap_py_dir}/check_fading_file.py
          --test-binary ${CMAKE_BINARY_DIR}/tests/sim_io_fading_curves_test
          --out ${_capgap_py_work}/fading/fading.h5
          --checker ${_capgap_py_dir}/check_h5_layout.py
          --plotter ${CMAKE_SOURCE_DIR}/analysis/plot_curves.py
  WORKING_DIRECTORY ${_capgap_py_work})
set_tests_properties(python_fading_file
  PROPERTIES LABELS python ENVIRONMENT "${_capgap_py_env}" TIMEOUT 300)

set_tests_properties(python_checker_rejects_broken_files python_plot_fake_file
  PROPERTIES LABELS python ENVIRONMENT "${_capgap_py_env}" TIMEOUT 120)
set_tests_properties(python_h5_layout_of_real_run
  PROPERTIES LABELS python ENVIRONMENT "${_capgap_py_env}" TIMEOUT 600)
