# Empty dependencies file for spreadfit.
# This may be replaced when dependencies are built.
