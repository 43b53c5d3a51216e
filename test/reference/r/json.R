# Minimal JSON writer shared by the fixture scripts (sourced, not run on its own).
# Numbers are written with the shortest of 15, 16 or 17 significant digits that reads back
# to the identical double. Vectors wrapped in I() are always written as arrays; other
# length-1 values as scalars. Non-finite numbers stop the script, unless the caller set
# options(fixture.allow_null = TRUE), when they are written as null.
num_text <- function(v) {
  finite <- is.finite(v)
  if (!all(finite) && !isTRUE(getOption("fixture.allow_null"))) stop("non-finite number in fixture")
  out <- sprintf("%.15g", v)
  for (digits in 16:17) {
    bad <- finite & as.numeric(out) != v
    if (!any(bad)) break
    out[bad] <- sprintf(paste0("%.", digits, "g"), v[bad])
  }
  stopifnot(all(as.numeric(out[finite]) == v[finite]))
  out[!finite] <- "null"
  out
}
str_text <- function(s) paste0('"', gsub('"', '\\\\"', gsub("\\\\", "\\\\\\\\", s)), '"')
to_json <- function(v) {
  if (is.null(v)) return("null")
  if (is.list(v)) {
    items <- vapply(v, to_json, "")
    if (!is.null(names(v))) return(paste0("{", paste0(str_text(names(v)), ":", items, collapse = ","), "}"))
    return(paste0("[", paste(items, collapse = ","), "]"))
  }
  items <- if (is.character(v)) str_text(v)
    else if (is.logical(v)) ifelse(v, "true", "false")
    else num_text(as.numeric(v))
  if (length(v) == 1 && !inherits(v, "AsIs")) items else paste0("[", paste(items, collapse = ","), "]")
}
