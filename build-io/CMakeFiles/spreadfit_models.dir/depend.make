# Empty dependencies file for spreadfit_models.
# This may be replaced when dependencies are built.
