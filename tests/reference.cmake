# Tests of the Fredholm-determinant reference (tests/reference), Bornemann (2010).
edgelaw_test(reference_test SOURCES reference_test.cpp LIBS edgelaw_reference)
add_test(NAME reference_check_fredholm_mpmath
         COMMAND /usr/bin/python3 ${CMAKE_CURRENT_SOURCE_DIR}/reference/check_fredholm.py
                 $<TARGET_FILE:reference_values>)
set_tests_properties(reference_check_fredholm_mpmath PROPERTIES LABELS slow TIMEOUT 2400)
