file(REMOVE_RECURSE
  "CMakeFiles/spreadfit_tool.dir/src/io/input_error.cpp.o"
  "CMakeFiles/spreadfit_tool.dir/src/io/input_error.cpp.o.d"
  "CMakeFiles/spreadfit_tool.dir/src/io/readings_csv.cpp.o"
  "CMakeFiles/spreadfit_tool.dir/src/io/readings_csv.cpp.o.d"
  "CMakeFiles/spreadfit_tool.dir/src/io/test_description.cpp.o"
  "CMakeFiles/spreadfit_tool.dir/src/io/test_description.cpp.o.d"
  "CMakeFiles/spreadfit_tool.dir/src/io/units.cpp.o"
  "CMakeFiles/spreadfit_tool.dir/src/io/units.cpp.o.d"
  "CMakeFiles/spreadfit_tool.dir/src/version.cpp.o"
  "CMakeFiles/spreadfit_tool.dir/src/version.cpp.o.d"
  "libspreadfit_tool.a"
  "libspreadfit_tool.pdb"
)

# Per-language clean rules from dependency scanning.
foreach(lang CXX)
  include(CMakeFiles/spreadfit_tool.dir/cmake_clean_${lang}.cmake OPTIONAL)
endforeach()
