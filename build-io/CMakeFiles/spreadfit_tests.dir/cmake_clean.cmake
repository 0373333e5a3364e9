file(REMOVE_RECURSE
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_readings_csv.cpp.o"
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_readings_csv.cpp.o.d"
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_test_description.cpp.o"
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_test_description.cpp.o.d"
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_units.cpp.o"
  "CMakeFiles/spreadfit_tests.dir/tests/io/test_units.cpp.o.d"
  "CMakeFiles/spreadfit_tests.dir/tests/main.cpp.o"
  "CMakeFiles/spreadfit_tests.dir/tests/main.cpp.o.d"
  "CMakeFiles/spreadfit_tests.dir/tests/models/test_thin_film.cpp.o"
  "CMakeFiles/spreadfit_tests.dir/tests/models/test_thin_film.cpp.o.d"
  "spreadfit_tests"
  "spreadfit_tests.pdb"
  "spreadfit_tests_tests-b858cb2.cmake"
)

# Per-language clean rules from dependency scanning.
foreach(lang CXX)
  include(CMakeFiles/spreadfit_tests.dir/cmake_clean_${lang}.cmake OPTIONAL)
endforeach()
