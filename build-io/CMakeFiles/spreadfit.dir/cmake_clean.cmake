file(REMOVE_RECURSE
  "CMakeFiles/spreadfit.dir/src/cli/main.cpp.o"
  "CMakeFiles/spreadfit.dir/src/cli/main.cpp.o.d"
  "spreadfit"
  "spreadfit.pdb"
)

# Per-language clean rules from dependency scanning.
foreach(lang CXX)
  include(CMakeFiles/spreadfit.dir/cmake_clean_${lang}.cmake OPTIONAL)
endforeach()
