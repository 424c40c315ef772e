# Smoke test that the benchmark's Fredholm competitor agrees with tests/reference (a few seconds).
if(EDGELAW_BUILD_BENCH)
  find_package(Boost REQUIRED)
  edgelaw_test(bench_fredholm_test SOURCES bench_fredholm_test.cpp
               LIBS edgelaw_bench_fredholm edgelaw_reference Boost::headers LABELS fast)
endif()
