# Reference values for inverse tables (inverse prediction, or calibration, intervals).
#
# Run from the repository root:   Rscript test/reference/r/inverse.R
# Writes:                         test/reference/fixtures/inverse.json
# Needs:                          R >= 4.2 (stats, splines, datasets)
#
# Definition (core/calibrate/inverse.ts): for a reading y0, the interval is the lowest and
# highest x in the data range [min x, max x] with
#   (y0 - f(x))^2 <= t^2 (s^2 / m + se(x)^2 + (f'(x) u)^2),
# s the residual standard error, se(x) the standard error of the fitted mean, t the Student
# t quantile (1 + level) / 2 on the residual degrees of freedom, m readings averaged, u the
# reference standard's standard uncertainty in units of x. Where the set reaches an end of
# the data range, that end is open (written as null).
#
# straight: lm(y ~ x). The ends are the roots of
#   (y0 - a - b x0)^2 = t^2 s^2 (1/m + 1/n + (x0 - xbar)^2 / Sxx)
# in the closed form of Draper & Smith (1998), Applied Regression Analysis, 3rd ed., section
# 3.2 (also Brown 1993, Measurement, Regression, and Calibration, chapter 1): with
# g = t^2 s^2 / (b^2 Sxx) and d = (y0 - ybar) / b,
#   x0 = xbar + (d -+ (t s / |b|) sqrt(d^2 / Sxx + (1 - g)(1/m + 1/n))) / (1 - g),
# checked here against polyroot() of the expanded quadratic. Both roots are written
# (rootLower, rootUpper), whether or not they lie in the data range.
#
# spline: lm(y ~ splines::ns(x, df = k - 1)) (Knotwise's natural spline with df = k, see
# test/reference/r/fits.R), se(x) from predict(se.fit = TRUE), f'(x) by central differences
# of predict() (step 1e-6 of the x range). The ends are found by brute force: the band gap
# (y0 - f)^2 - t^2 (...) on a grid of 20001 points over the data range, then uniroot() on
# the first and last bracket where it changes sign; the estimate x^ by uniroot() on f - y0.

suppressPackageStartupMessages(library(splines))

out_path <- file.path("test", "reference", "fixtures", "inverse.json")
if (!dir.exists(dirname(out_path))) dir.create(dirname(out_path), recursive = TRUE)
source(file.path("test", "reference", "r", "json.R"))
options(fixture.allow_null = TRUE)

datasets <- list(
  cars = list(
    source = "datasets::cars (Ezekiel 1930), speed [mph] -> dist [ft]; increasing",
    x = as.numeric(cars$speed), y = as.numeric(cars$dist)
  ),
  mtcars = list(
    source = "datasets::mtcars (Henderson & Velleman 1981), wt [1000 lb] -> mpg; decreasing",
    x = as.numeric(mtcars$wt), y = as.numeric(mtcars$mpg)
  ),
  dnase = list(
    source = "datasets::DNase run 1 (Davidian & Giltinan 1995), ELISA: conc [ng/ml] -> optical density; increasing, saturating",
    x = as.numeric(DNase$conc[DNase$Run == 1]), y = as.numeric(DNase$density[DNase$Run == 1])
  )
)

# ---- straight line: closed form --------------------------------------------------------
straight_readings <- list(
  # 10: lower end open; 40, 45: both ends closed; 70: upper end open; 90: outside the
  # reading range, lower end closed; 150: outside, no x in range has the reading in its band.
  cars = c(10, 40, 45, 70, 90, 150),
  # 28: lower end open (decreasing curve); 12, 20: closed; 31: outside.
  mtcars = c(12, 20, 28, 31)
)

straight_case <- function(name, y0, m, level) {
  d <- datasets[[name]]
  x <- d$x
  y <- d$y
  fit <- lm(y ~ x)
  n <- length(x)
  a <- unname(coef(fit)[1])
  b <- unname(coef(fit)[2])
  s <- summary(fit)$sigma
  tq <- qt((1 + level) / 2, n - 2)
  xbar <- mean(x)
  ybar <- mean(y)
  sxx <- sum((x - xbar)^2)
  g <- tq^2 * s^2 / (b^2 * sxx)
  stopifnot(g < 1)
  dd <- (y0 - ybar) / b
  half <- (tq * s / abs(b)) * sqrt(dd^2 / sxx + (1 - g) * (1 / m + 1 / n))
  roots <- sort(xbar + c(dd - half, dd + half) / (1 - g))
  # Cross-check: the expanded quadratic c0 + c1 x0 + c2 x0^2 = 0.
  k <- tq^2 * s^2
  c2 <- b^2 - k / sxx
  c1 <- -2 * b * (y0 - a) + 2 * k * xbar / sxx
  c0 <- (y0 - a)^2 - k * (1 / m + 1 / n + xbar^2 / sxx)
  pr <- sort(Re(polyroot(c(c0, c1, c2))))
  stopifnot(isTRUE(all.equal(pr, roots, tolerance = 1e-10)))
  list(
    dataset = name, reading = y0, readingsAveraged = m, level = level,
    n = n, intercept = a, slope = b, sigma = s, t = tq,
    estimate = (y0 - a) / b,
    rootLower = roots[1], rootUpper = roots[2],
    lowerInRange = roots[1] > min(x) && roots[1] < max(x),
    upperInRange = roots[2] > min(x) && roots[2] < max(x)
  )
}

straight <- list()
for (name in names(straight_readings)) {
  for (y0 in straight_readings[[name]]) {
    for (m in c(1, 3)) straight[[length(straight) + 1]] <- straight_case(name, y0, m, 0.95)
  }
  straight[[length(straight) + 1]] <- straight_case(name, straight_readings[[name]][2], 1, 0.90)
}

# ---- natural spline: brute force -------------------------------------------------------
spline_case <- function(name, k, y0, m, u, level) {
  d <- datasets[[name]]
  x <- d$x
  y <- d$y
  fit <- lm(y ~ ns(x, df = k - 1))
  s <- summary(fit)$sigma
  tq <- qt((1 + level) / 2, df.residual(fit))
  lo <- min(x)
  hi <- max(x)
  h <- 1e-6 * (hi - lo)
  f <- function(x0) unname(predict(fit, data.frame(x = x0)))
  gap <- function(x0) {
    p <- predict(fit, data.frame(x = x0), se.fit = TRUE)
    slope <- (f(x0 + h) - f(x0 - h)) / (2 * h)
    (y0 - unname(p$fit))^2 - tq^2 * (s^2 / m + unname(p$se.fit)^2 + (slope * u)^2)
  }
  grid <- seq(lo, hi, length.out = 20001)
  stopifnot(all(diff(f(grid)) > 0))
  gv <- gap(grid)
  solve <- function(i) uniroot(gap, c(grid[i], grid[i + 1]), tol = 1e-15 * (hi - lo), maxiter = 1000)$root
  change <- which(diff(sign(gv)) != 0)
  lower <- if (gv[1] <= 0) NA_real_ else if (length(change) > 0) solve(change[1]) else NA_real_
  upper <- if (gv[length(gv)] <= 0) NA_real_ else if (length(change) > 0) solve(change[length(change)]) else NA_real_
  range_y <- range(f(grid))
  estimate <- if (y0 >= range_y[1] && y0 <= range_y[2]) uniroot(function(x0) f(x0) - y0, c(lo, hi), tol = 1e-15 * (hi - lo), maxiter = 1000)$root else NA_real_
  list(
    dataset = name, df = k, reading = y0, readingsAveraged = m, referenceUncertainty = u, level = level,
    sigma = s, t = tq, estimate = estimate, lower = lower, upper = upper,
    knots = I(unname(c(attr(ns(x, df = k - 1), "Boundary.knots")[1], attr(ns(x, df = k - 1), "knots"), attr(ns(x, df = k - 1), "Boundary.knots")[2])))
  )
}

spline <- list()
for (y0 in c(0.05, 0.1, 0.5, 1.0, 1.5, 1.71, 1.75, 1.8)) {
  for (m in c(1, 3)) {
    for (u in c(0, 0.05)) spline[[length(spline) + 1]] <- spline_case("dnase", 4, y0, m, u, 0.95)
  }
}

data_out <- lapply(datasets, function(d) list(source = d$source, x = I(d$x), y = I(d$y)))

doc <- list(
  generatedBy = "test/reference/r/inverse.R",
  rVersion = R.version.string,
  datasets = data_out,
  straight = straight,
  spline = spline
)

# The writer reads its own "null" back as NA for open ends, which R reports as a coercion warning.
writeLines(suppressWarnings(to_json(doc)), out_path)
cat(sprintf("wrote %s: %d straight-line cases, %d spline cases\n", out_path, length(straight), length(spline)))
