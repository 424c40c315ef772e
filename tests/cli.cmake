# Tests of the command line: the library behind it (C++) and the program end to end (bash, Python).
edgelaw_test(cli_test SOURCES cli_test.cpp LIBS edgelaw_cli_support hdf5::hdf5 LABELS fast WHOLE)
edgelaw_test(cli_quantile_test SOURCES cli_quantile_test.cpp LIBS edgelaw_cli_support edgelaw_reference LABELS slow)

# Bad input: one stderr line, the documented exit code, no file left behind.
add_test(NAME cli_errors
         COMMAND bash ${CMAKE_CURRENT_SOURCE_DIR}/cli_errors.sh $<TARGET_FILE:edgelaw>
                 ${CMAKE_CURRENT_BINARY_DIR}/cli_errors_tmp)
set_tests_properties(cli_errors PROPERTIES LABELS fast TIMEOUT 120)

# The system interpreter has h5py (see tables.cmake for why it is looked up in /usr/bin).
find_program(EDGELAW_SYSTEM_PYTHON NAMES python3 PATHS /usr/bin NO_DEFAULT_PATH)
if(EDGELAW_SYSTEM_PYTHON)
  add_test(NAME cli_sweep_check
           COMMAND ${EDGELAW_SYSTEM_PYTHON} ${CMAKE_CURRENT_SOURCE_DIR}/cli_sweep_check.py
                   --edgelaw $<TARGET_FILE:edgelaw> --workdir ${CMAKE_CURRENT_BINARY_DIR}/cli_sweep_tmp)
  set_tests_properties(cli_sweep_check PROPERTIES LABELS slow TIMEOUT 600)
endif()

# Statistics subcommands end to end: bad input and commands that must invert each other.
add_test(NAME cli_stats_check
         COMMAND bash ${CMAKE_CURRENT_SOURCE_DIR}/cli_stats_check.sh $<TARGET_FILE:edgelaw>
                 ${CMAKE_CURRENT_BINARY_DIR}/cli_stats_tmp)
set_tests_properties(cli_stats_check PROPERTIES LABELS fast TIMEOUT 300)

# Interrupted work (SIGINT, SIGTERM, SIGKILL during a solve, a write and a sweep) and
# concurrent use (two sweeps at once, a reader while the table is replaced).
if(EDGELAW_SYSTEM_PYTHON)
  foreach(check cli_interrupt_check cli_concurrency_check)
    add_test(NAME ${check}
             COMMAND ${EDGELAW_SYSTEM_PYTHON} ${CMAKE_CURRENT_SOURCE_DIR}/${check}.py
                     --edgelaw $<TARGET_FILE:edgelaw> --workdir ${CMAKE_CURRENT_BINARY_DIR}/${check}_tmp)
    set_tests_properties(${check} PROPERTIES LABELS fast TIMEOUT 600)
  endforeach()
endif()
