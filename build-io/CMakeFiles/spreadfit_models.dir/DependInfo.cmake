
# Consider dependencies only in project.
set(CMAKE_DEPENDS_IN_PROJECT_ONLY OFF)

# The set of languages for which implicit dependencies are needed:
set(CMAKE_DEPENDS_LANGUAGES
  )

# The set of dependency files which are needed:
set(CMAKE_DEPENDS_DEPENDENCY_FILES
  "/work/main/models/closed_forms.cpp" "CMakeFiles/spreadfit_models.dir/models/closed_forms.cpp.o" "gcc" "CMakeFiles/spreadfit_models.dir/models/closed_forms.cpp.o.d"
  "/work/main/models/low_order.cpp" "CMakeFiles/spreadfit_models.dir/models/low_order.cpp.o" "gcc" "CMakeFiles/spreadfit_models.dir/models/low_order.cpp.o.d"
  "/work/main/models/rheology.cpp" "CMakeFiles/spreadfit_models.dir/models/rheology.cpp.o" "gcc" "CMakeFiles/spreadfit_models.dir/models/rheology.cpp.o.d"
  "/work/main/models/side_wall.cpp" "CMakeFiles/spreadfit_models.dir/models/side_wall.cpp.o" "gcc" "CMakeFiles/spreadfit_models.dir/models/side_wall.cpp.o.d"
  "/work/main/models/thin_film.cpp" "CMakeFiles/spreadfit_models.dir/models/thin_film.cpp.o" "gcc" "CMakeFiles/spreadfit_models.dir/models/thin_film.cpp.o.d"
  )

# Targets to which this target links.
set(CMAKE_TARGET_LINKED_INFO_FILES
  )

# Fortran module output directory.
set(CMAKE_Fortran_TARGET_MODULE_DIR "")
