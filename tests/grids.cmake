# Tests of the angle grid and its stencils (tests/grids_test.cpp).
edgelaw_test(grids_test SOURCES grids_test.cpp LIBS edgelaw_grids)
