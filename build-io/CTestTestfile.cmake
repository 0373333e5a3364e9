# CMake generated Testfile for 
# Source directory: /work/main
# Build directory: /work/main/build-io
# 
# This file includes the relevant testing commands required for 
# testing this directory and lists subdirectories to be tested as well.
include("/work/main/build-io/spreadfit_tests_include-b858cb2.cmake")
