
# Consider dependencies only in project.
set(CMAKE_DEPENDS_IN_PROJECT_ONLY OFF)

# The set of languages for which implicit dependencies are needed:
set(CMAKE_DEPENDS_LANGUAGES
  )

# The set of dependency files which are needed:
set(CMAKE_DEPENDS_DEPENDENCY_FILES
  "/work/main/src/io/input_error.cpp" "CMakeFiles/spreadfit_tool.dir/src/io/input_error.cpp.o" "gcc" "CMakeFiles/spreadfit_tool.dir/src/io/input_error.cpp.o.d"
  "/work/main/src/io/readings_csv.cpp" "CMakeFiles/spreadfit_tool.dir/src/io/readings_csv.cpp.o" "gcc" "CMakeFiles/spreadfit_tool.dir/src/io/readings_csv.cpp.o.d"
  "/work/main/src/io/test_description.cpp" "CMakeFiles/spreadfit_tool.dir/src/io/test_description.cpp.o" "gcc" "CMakeFiles/spreadfit_tool.dir/src/io/test_description.cpp.o.d"
  "/work/main/src/io/units.cpp" "CMakeFiles/spreadfit_tool.dir/src/io/units.cpp.o" "gcc" "CMakeFiles/spreadfit_tool.dir/src/io/units.cpp.o.d"
  "/work/main/src/version.cpp" "CMakeFiles/spreadfit_tool.dir/src/version.cpp.o" "gcc" "CMakeFiles/spreadfit_tool.dir/src/version.cpp.o.d"
  )

# Targets to which this target links.
set(CMAKE_TARGET_LINKED_INFO_FILES
  "/work/main/build-io/CMakeFiles/spreadfit_models.dir/DependInfo.cmake"
  )

# Fortran module output directory.
set(CMAKE_Fortran_TARGET_MODULE_DIR "")
