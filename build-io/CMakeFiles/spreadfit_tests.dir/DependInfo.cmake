
# Consider dependencies only in project.
set(CMAKE_DEPENDS_IN_PROJECT_ONLY OFF)

# The set of languages for which implicit dependencies are needed:
set(CMAKE_DEPENDS_LANGUAGES
  )

# The set of dependency files which are needed:
set(CMAKE_DEPENDS_DEPENDENCY_FILES
  "/work/main/tests/io/test_readings_csv.cpp" "CMakeFiles/spreadfit_tests.dir/tests/io/test_readings_csv.cpp.o" "gcc" "CMakeFiles/spreadfit_tests.dir/tests/io/test_readings_csv.cpp.o.d"
  "/work/main/tests/io/test_test_description.cpp" "CMakeFiles/spreadfit_tests.dir/tests/io/test_test_description.cpp.o" "gcc" "CMakeFiles/spreadfit_tests.dir/tests/io/test_test_description.cpp.o.d"
  "/work/main/tests/io/test_units.cpp" "CMakeFiles/spreadfit_tests.dir/tests/io/test_units.cpp.o" "gcc" "CMakeFiles/spreadfit_tests.dir/tests/io/test_units.cpp.o.d"
  "/work/main/tests/main.cpp" "CMakeFiles/spreadfit_tests.dir/tests/main.cpp.o" "gcc" "CMakeFiles/spreadfit_tests.dir/tests/main.cpp.o.d"
  "/work/main/tests/models/test_thin_film.cpp" "CMakeFiles/spreadfit_tests.dir/tests/models/test_thin_film.cpp.o" "gcc" "CMakeFiles/spreadfit_tests.dir/tests/models/test_thin_film.cpp.o.d"
  )

# Targets to which this target links.
set(CMAKE_TARGET_LINKED_INFO_FILES
  "/work/main/build-io/CMakeFiles/spreadfit_tool.dir/DependInfo.cmake"
  "/work/main/build-io/CMakeFiles/spreadfit_models.dir/DependInfo.cmake"
  )

# Fortran module output directory.
set(CMAKE_Fortran_TARGET_MODULE_DIR "")
