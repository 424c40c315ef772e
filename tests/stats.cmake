# stats: finite-n maps to the edge law's (x, w). Identities are fast; the simulation-versus-law
# Kolmogorov checks (a few minutes each on one core) are slow.
edgelaw_test(stats_maps_test SOURCES stats_maps_test.cpp LIBS edgelaw_stats LABELS fast)
edgelaw_test(stats_maps_simulation_test SOURCES stats_maps_simulation_test.cpp
             LIBS edgelaw_stats edgelaw_simulate edgelaw_solver Eigen3::Eigen LABELS slow)
