# Reference two-dimensional histograms for the density grid that the panel and the report
# draw when readings would overplot (core/view/cloud.ts cloudOf, on the grid size it ships
# with, DEFAULT_CLOUD_LIMITS).
#
# Run from the repository root:   Rscript test/reference/r/density.R
# Writes:                         test/reference/fixtures/density.json
# Needs:                          R (base, stats, datasets) and MASS (Debian: r-base-core, r-cran-mass)
#
# Reference: table(cut(y, yb, right = FALSE, include.lowest = TRUE),
#                  cut(x, xb, right = FALSE, include.lowest = TRUE))
# with breaks xb = seq(min(x), max(x), length.out = nx + 1) and likewise yb: every cell is
# half-open [lo, hi) except the last of each axis, which also holds the maximum. Counts are
# written row-major with the rows being y cells from the lowest, as CloudBins.counts is.
#
# Data: R's open datasets faithful (eruptions, waiting), quakes (long, lat), airquality
# (Solar.R, Ozone; 42 rows miss one of the two, written as null, which cloudOf leaves
# out as table() leaves out NA) and MASS::geyser (waiting, duration), in their stored
# order. A reading lying on or within 1e-9 (relative to the cell width) of an interior
# break would make the test depend on how each side rounds the break, so the script stops
# if one does.

suppressPackageStartupMessages(library(MASS))

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- if (length(script) == 1) normalizePath(file.path(dirname(script), "..", "..", "..")) else getwd()
source(file.path(root, "test", "reference", "r", "json.R"))
out_file <- file.path(root, "test", "reference", "fixtures", "density.json")

# The grid size cloudOf uses (core/view/cloud.ts DEFAULT_CLOUD_LIMITS); the test checks they agree.
nx <- 64L
ny <- 40L

near_break <- function(v, b) {
  w <- b[2] - b[1]
  inner <- b[2:(length(b) - 1)]
  any(vapply(v, function(a) any(abs(a - inner) <= 1e-9 * w), TRUE))
}

histogram <- function(name, x, y) {
  keep <- is.finite(x) & is.finite(y)
  xb <- seq(min(x[keep]), max(x[keep]), length.out = nx + 1)
  yb <- seq(min(y[keep]), max(y[keep]), length.out = ny + 1)
  if (near_break(x[keep], xb) || near_break(y[keep], yb)) stop("density reference: a reading of ", name, " lies on an interior break")
  tab <- table(
    cut(y, yb, right = FALSE, include.lowest = TRUE),
    cut(x, xb, right = FALSE, include.lowest = TRUE)
  )
  list(
    name = name,
    x = I(as.numeric(x)),
    y = I(as.numeric(y)),
    counts = I(as.integer(t(unclass(tab)))) # row-major, rows = y cells from the lowest
  )
}

options(fixture.allow_null = TRUE) # the missing airquality readings
cases <- list(
  histogram("faithful: waiting against eruptions", faithful$eruptions, faithful$waiting),
  histogram("quakes: lat against long", quakes$long, quakes$lat),
  histogram("airquality: Ozone against Solar.R", airquality$Solar.R, airquality$Ozone),
  histogram("MASS::geyser: duration against waiting", geyser$waiting, geyser$duration)
)

fixture <- list(
  generator = "test/reference/r/density.R",
  r = R.version.string,
  nx = nx,
  ny = ny,
  cases = cases
)
# json.R compares the text of each number with its value; NA gives harmless coercion warnings.
writeLines(suppressWarnings(to_json(fixture)), out_file, useBytes = TRUE)
cat("wrote test/reference/fixtures/density.json\n")
