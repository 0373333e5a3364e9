# Empty dependencies file for spreadfit_tool.
# This may be replaced when dependencies are built.
