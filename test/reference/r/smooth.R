# Reference values for the cubic smoothing spline (family 'smooth').
#
# Run from the repository root:   Rscript test/reference/r/smooth.R
# Writes:                         test/reference/fixtures/smooth.json
# Needs:                          R >= 4.2 (stats), MASS and jsonlite
#                                 (Debian: r-base, r-cran-mass, r-cran-jsonlite)
#
# Reference: stats::smooth.spline(x, y, w, all.knots = TRUE, df = k), which minimises
# sum w_i (y_i - f(x_i))^2 + lambda * integral f''^2 over cubic splines with a knot at every
# distinct x (B-spline basis, exact penalty), i.e. the definition in DESIGN.md. R matches
# the asked df only approximately (it searches its own smoothing parameter 'spar'), so the
# achieved trace fit$df (= sum(fit$lev)) is recorded and the test fits at that df.
#
# Recorded per case: R's achieved df, R's lambda (R's own scaling of x and weights, kept for
# information only), the distinct x with R's pooled weights and leverages (fit$x, fit$w,
# fit$lev), fitted values at every row's x, and predictions on a grid inside the data range.
# Numbers are written with 15 significant digits (jsonlite, digits = NA).

suppressPackageStartupMessages({
  library(MASS)
  library(jsonlite)
})

out_path <- file.path("test", "reference", "fixtures", "smooth.json")
if (!dir.exists(dirname(out_path))) {
  stop("run this script from the repository root (", dirname(out_path), " not found)")
}

# ---- open datasets shipped with R ---------------------------------------------------------
datasets <- list(
  cars = list(
    source = "datasets::cars (Ezekiel 1930), speed -> dist; tied x",
    x = as.numeric(cars$speed), y = as.numeric(cars$dist), w = NULL
  ),
  mcycle = list(
    source = "MASS::mcycle (Silverman 1985, motorcycle crash test), times -> accel; tied x",
    x = as.numeric(MASS::mcycle$times), y = as.numeric(MASS::mcycle$accel), w = NULL
  ),
  women = list(
    source = "datasets::women (McNeil 1977), height -> weight",
    x = as.numeric(women$height), y = as.numeric(women$weight), w = NULL
  ),
  # Weighted case: stopping distance spreads more at higher speed, so the deterministic
  # prior weights w = 1 / speed (variance taken proportional to speed) are used.
  cars_w = list(
    source = "datasets::cars, speed -> dist, prior weights w = 1 / speed (deterministic)",
    x = as.numeric(cars$speed), y = as.numeric(cars$dist), w = 1 / as.numeric(cars$speed)
  )
)

asked <- list(
  cars = c(2.5, 5, 10),
  mcycle = c(4, 8, 12, 20),
  women = c(3, 5, 10),
  cars_w = c(4, 7)
)

cases <- list()
for (name in names(asked)) {
  d <- datasets[[name]]
  w <- if (is.null(d$w)) rep(1, length(d$x)) else d$w
  grid <- seq(min(d$x), max(d$x), length.out = 41)
  for (k in asked[[name]]) {
    fit <- smooth.spline(d$x, d$y, w = w, all.knots = TRUE, df = k)
    stopifnot(length(fit$x) == length(unique(d$x)))
    cases[[length(cases) + 1]] <- list(
      name = sprintf("%s df %g", name, k),
      dataset = name,
      askedDf = k,
      rCall = sprintf("smooth.spline(x, y, w, all.knots = TRUE, df = %g)", k),
      df = fit$df,
      rLambda = fit$lambda,
      xDistinct = I(fit$x),
      wDistinct = I(fit$w),
      lev = I(fit$lev),
      fitted = I(predict(fit, d$x)$y),
      grid = I(grid),
      predicted = I(predict(fit, grid)$y)
    )
  }
}

out <- list(
  generatedBy = "test/reference/r/smooth.R",
  rVersion = R.version.string,
  datasets = lapply(datasets, function(d) {
    list(source = d$source, x = I(d$x), y = I(d$y), w = if (is.null(d$w)) NULL else I(d$w))
  }),
  cases = cases
)
writeLines(toJSON(out, digits = NA, auto_unbox = TRUE, null = "null", pretty = FALSE), out_path)
cat("wrote", out_path, "with", length(cases), "cases\n")
