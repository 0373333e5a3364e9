file(REMOVE_RECURSE
  "libspreadfit_tool.a"
)
