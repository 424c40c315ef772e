# Tests of the PDE solver against independent references (tests/solver_*.cpp).
edgelaw_test(solver_test SOURCES solver_test.cpp LIBS edgelaw_solver edgelaw_reference WHOLE)
edgelaw_test(solver_accuracy_test SOURCES solver_accuracy_test.cpp LIBS edgelaw_solver edgelaw_reference LABELS slow WHOLE)
edgelaw_test(solver_limits_test SOURCES solver_limits_test.cpp LIBS edgelaw_solver edgelaw_simulate LABELS slow WHOLE)
edgelaw_test(solver_input_test SOURCES solver_input_test.cpp LIBS edgelaw_solver)
edgelaw_test(solver_operator_test SOURCES solver_operator_test.cpp LIBS edgelaw_solver)
