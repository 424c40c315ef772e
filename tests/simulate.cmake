# simulate: Monte Carlo samplers, Sturm eigenvalues, Kolmogorov tools (about 20 s of CPU time, 2 threads).
edgelaw_test(simulate_test SOURCES simulate_test.cpp LIBS edgelaw_simulate Eigen3::Eigen LABELS fast)
