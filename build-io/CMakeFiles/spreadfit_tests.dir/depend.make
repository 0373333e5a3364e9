# Empty dependencies file for spreadfit_tests.
# This may be replaced when dependencies are built.
