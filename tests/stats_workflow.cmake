# Statistics workflows (stats/): p-values, critical values, power, intervals, data input.
edgelaw_test(stats_workflow_test SOURCES stats_workflow_test.cpp LIBS edgelaw_stats edgelaw_reference LABELS fast WHOLE)
target_compile_definitions(stats_workflow_test PRIVATE EDGELAW_TEST_DATA="${CMAKE_CURRENT_SOURCE_DIR}/data")
# Interval coverage on simulated datasets (two law solves and 1200 intervals, a few minutes).
edgelaw_test(stats_coverage_test SOURCES stats_coverage_test.cpp LIBS edgelaw_stats LABELS slow)
