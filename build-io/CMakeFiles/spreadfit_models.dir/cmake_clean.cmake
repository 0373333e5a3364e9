file(REMOVE_RECURSE
  "CMakeFiles/spreadfit_models.dir/models/closed_forms.cpp.o"
  "CMakeFiles/spreadfit_models.dir/models/closed_forms.cpp.o.d"
  "CMakeFiles/spreadfit_models.dir/models/low_order.cpp.o"
  "CMakeFiles/spreadfit_models.dir/models/low_order.cpp.o.d"
  "CMakeFiles/spreadfit_models.dir/models/rheology.cpp.o"
  "CMakeFiles/spreadfit_models.dir/models/rheology.cpp.o.d"
  "CMakeFiles/spreadfit_models.dir/models/side_wall.cpp.o"
  "CMakeFiles/spreadfit_models.dir/models/side_wall.cpp.o.d"
  "CMakeFiles/spreadfit_models.dir/models/thin_film.cpp.o"
  "CMakeFiles/spreadfit_models.dir/models/thin_film.cpp.o.d"
  "libspreadfit_models.a"
  "libspreadfit_models.pdb"
)

# Per-language clean rules from dependency scanning.
foreach(lang CXX)
  include(CMakeFiles/spreadfit_models.dir/cmake_clean_${lang}.cmake OPTIONAL)
endforeach()
