# Tests of the tables library (HDF5 table format, reader validation, interpolation).
edgelaw_test(tables_test
  SOURCES tables_test.cpp tables_family.cpp
  LIBS edgelaw::tables hdf5::hdf5
  LABELS fast)

# Writes sample files and the C++ reader's values for the Python/netCDF/R interoperability check.
find_package(nlohmann_json REQUIRED)
add_executable(tables_fixture tables_fixture.cpp tables_family.cpp)
target_link_libraries(tables_fixture PRIVATE edgelaw::tables nlohmann_json::nlohmann_json)
target_include_directories(tables_fixture PRIVATE ${PROJECT_SOURCE_DIR})

# The system interpreter has h5py/xarray/h5netcdf; a python3 earlier on PATH may not.
find_program(EDGELAW_SYSTEM_PYTHON NAMES python3 PATHS /usr/bin NO_DEFAULT_PATH)
find_program(EDGELAW_NCDUMP ncdump)
find_program(EDGELAW_RSCRIPT Rscript)
if(EDGELAW_SYSTEM_PYTHON)
  add_test(NAME tables_python_check
           COMMAND ${EDGELAW_SYSTEM_PYTHON} ${CMAKE_CURRENT_SOURCE_DIR}/tables_python_check.py
                   --fixture $<TARGET_FILE:tables_fixture>
                   --workdir ${CMAKE_CURRENT_BINARY_DIR}/tables_python_tmp
                   --ncdump "${EDGELAW_NCDUMP}" --rscript "${EDGELAW_RSCRIPT}")
  set_tests_properties(tables_python_check PROPERTIES LABELS fast TIMEOUT 120)
endif()
