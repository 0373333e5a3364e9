file(REMOVE_RECURSE
  "libspreadfit_models.a"
)
