# Read by ctest after the doctest discovery script (CMakeLists.txt: TEST_INCLUDE_FILES), which lists every test
# case of spreadfit_tests in spreadfit_tests_TESTS. Labels each by its name: the Monte Carlo coverage tests
# (names starting "montecarlo") get `montecarlo`, every other test `fast`, so `ctest -LE montecarlo` or
# `ctest -L fast` runs the quick part; plain ctest (scripts/test) still runs everything.
foreach(spreadfit_test IN LISTS spreadfit_tests_TESTS)
  if(spreadfit_test MATCHES "^montecarlo")
    set_tests_properties("${spreadfit_test}" PROPERTIES LABELS montecarlo)
  else()
    set_tests_properties("${spreadfit_test}" PROPERTIES LABELS fast)
  endif()
endforeach()
