# Reference values for the influence rules, the effect sizes of the residual checks and
# the F quantile in core/stats (influence.ts, effects.ts, distributions.ts qf).
#
# Run from the repository root:   Rscript test/reference/r/influence.R
# Writes:                         test/reference/fixtures/influence.json
# Needs:                          R >= 4.2 (stats, splines) and MASS (Debian: r-base, r-cran-mass)
#
# Definitions (docs/design.md, "df"): df counts the intercept; the natural spline with df = k is
# ns(x, df = k - 1) plus an intercept.
#
# Influence rules (core/stats/influence.ts), written here with R's own functions:
#   outlier:  |rstudent| > qt(0.05 / (2 n), n - p - 1, lower.tail = FALSE) for lm,
#             |rstudent| > qnorm(0.05 / (2 n), lower.tail = FALSE) for glm (rstudent.glm);
#   cooks:    cooks.distance > qf(0.5, p, n - p);
#   leverage: hatvalues > max(0.5, 3 p / n).
# Effect sizes (core/stats/effects.ts), on the lm residuals in x order:
#   lag-1 correlation acf(e, lag.max = 1, demean = FALSE)$acf[2];
#   skewness mean((e - m)^3) / mean((e - m)^2)^1.5, excess kurtosis mean((e - m)^4) / mean((e - m)^2)^2 - 3;
#   spread ratio: largest over smallest root mean square of e in thirds of the rows
#   (rows floor(k n / 3) + 1 .. floor((k + 1) n / 3));
#   runs of the signs of e by rle, with the Wald-Wolfowitz mean and variance and pnorm.
#
# Data: open datasets shipped with R, each sorted by x (order() keeps ties in their order).
#
# Numbers are written with the shortest of 15, 16 or 17 significant digits that reads back to
# the identical double.

suppressPackageStartupMessages({
  library(splines)
  library(MASS)
})

out_path <- file.path("test", "reference", "fixtures", "influence.json")
source(file.path("test", "reference", "r", "json.R"))

sorted <- function(x, y) {
  o <- order(x)
  list(x = as.numeric(x[o]), y = as.numeric(y[o]))
}

datasets <- list(
  cars = c(list(source = "datasets::cars (Ezekiel 1930), speed -> dist"), sorted(cars$speed, cars$dist)),
  women = c(list(source = "datasets::women (McNeil 1977), height -> weight"), sorted(women$height, women$weight)),
  faithful = c(list(source = "datasets::faithful (Old Faithful geyser), eruptions -> waiting"), sorted(faithful$eruptions, faithful$waiting)),
  mcycle = c(list(source = "MASS::mcycle (Silverman 1985), times -> accel"), sorted(mcycle$times, mcycle$accel)),
  hills = c(list(source = "MASS::hills (Scottish hill races, Atkinson 1986), dist -> time; Knock Hill is a known outlier"), sorted(hills$dist, hills$time)),
  stackloss = c(list(source = "datasets::stackloss (Brownlee 1965), Air.Flow -> stack.loss"), sorted(stackloss$Air.Flow, stackloss$stack.loss)),
  discoveries = c(list(source = "datasets::discoveries (great inventions and discoveries per year, 1860-1959)"), sorted(as.numeric(time(discoveries)), as.numeric(discoveries)))
)

idx <- function(v) I(as.integer(which(v) - 1L)) # 0-based row indices, always an array

runs_of <- function(e) {
  s <- sign(e)
  s <- s[s != 0]
  n1 <- sum(s > 0); n2 <- sum(s < 0); N <- n1 + n2
  r <- length(rle(s)$lengths)
  m <- 2 * n1 * n2 / N + 1
  v <- 2 * n1 * n2 * (2 * n1 * n2 - N) / (N^2 * (N - 1))
  z <- (r - m) / sqrt(v)
  list(runs = r, expected = m, z = z, pValue = pnorm(z))
}

spread_ratio <- function(e) {
  n <- length(e)
  rms <- sapply(0:2, function(k) {
    from <- floor(k * n / 3) + 1
    to <- floor((k + 1) * n / 3)
    sqrt(mean(e[from:to]^2))
  })
  max(rms) / min(rms)
}

lm_case <- function(name, k) {
  d <- datasets[[name]]
  x <- d$x; y <- d$y
  fit <- if (k == 2) lm(y ~ x) else lm(y ~ ns(x, df = k - 1))
  stopifnot(fit$rank == k)
  n <- length(y); p <- k
  h <- as.numeric(hatvalues(fit)); cd <- as.numeric(cooks.distance(fit)); t <- as.numeric(rstudent(fit))
  tcrit <- qt(0.05 / (2 * n), n - p - 1, lower.tail = FALSE)
  fmed <- qf(0.5, p, n - p)
  hlim <- max(0.5, 3 * p / n)
  e <- as.numeric(residuals(fit))
  m <- mean(e)
  list(
    name = sprintf("%s lm df=%d", name, k), dataset = name, outcome = "continuous", df = k,
    rCall = if (k == 2) "lm(y ~ x)" else sprintf("lm(y ~ ns(x, df = %d))", k - 1),
    hat = I(h), cooks = I(cd), studentized = I(t),
    outlierLimit = tcrit, cooksLimit = fmed, leverageLimit = hlim,
    outliers = idx(abs(t) > tcrit), cooksRows = idx(cd > fmed), leverageRows = idx(h > hlim),
    residuals = I(e),
    lag1 = acf(e, lag.max = 1, demean = FALSE, plot = FALSE)$acf[2],
    skewness = mean((e - m)^3) / mean((e - m)^2)^1.5,
    excessKurtosis = mean((e - m)^4) / mean((e - m)^2)^2 - 3,
    spreadRatio = spread_ratio(e),
    runs = runs_of(e)
  )
}

glm_case <- function(name, k) {
  d <- datasets[[name]]
  x <- d$x; y <- d$y
  fit <- glm(y ~ ns(x, df = k - 1), family = poisson, control = glm.control(epsilon = 1e-15, maxit = 200))
  stopifnot(fit$converged, fit$rank == k)
  n <- length(y); p <- k
  h <- as.numeric(hatvalues(fit)); cd <- as.numeric(cooks.distance(fit)); t <- as.numeric(rstudent(fit))
  zcrit <- qnorm(0.05 / (2 * n), lower.tail = FALSE)
  fmed <- qf(0.5, p, n - p)
  hlim <- max(0.5, 3 * p / n)
  list(
    name = sprintf("%s poisson df=%d", name, k), dataset = name, outcome = "counts", df = k,
    rCall = sprintf("glm(y ~ ns(x, df = %d), family = poisson); rstudent.glm", k - 1),
    hat = I(h), cooks = I(cd), studentized = I(t),
    outlierLimit = zcrit, cooksLimit = fmed, leverageLimit = hlim,
    outliers = idx(abs(t) > zcrit), cooksRows = idx(cd > fmed), leverageRows = idx(h > hlim),
    dispersion = sum(residuals(fit, type = "pearson")^2) / df.residual(fit)
  )
}

# F quantiles through qbeta (Abramowitz & Stegun 1964, 26.6): R's qf itself returns
# qchisq(p, df1) / df1 when df2 > 4e5 (src/nmath/qf.c), about 1e-6 relative off at df2 = 1e6,
# which its own pf shows; the beta route is exact to R's qbeta accuracy at every df2.
qf_beta <- function(p, df1, df2, lower.tail = TRUE) {
  x <- qbeta(p, df1 / 2, df2 / 2, lower.tail = lower.tail)
  df2 * x / (df1 * (1 - x))
}
g <- expand.grid(p = c(0.5, 0.05, 0.95, 1e-6), df1 = c(1, 2, 3.5, 8, 20), df2 = c(3, 10.5, 46, 992, 999992))
qf_grid <- list(p = I(g$p), df1 = I(g$df1), df2 = I(g$df2), lower = I(qf_beta(g$p, g$df1, g$df2)), upper = I(qf_beta(g$p, g$df1, g$df2, lower.tail = FALSE)))
stopifnot(all(abs(pf(qf_grid$lower, g$df1, g$df2) - g$p) <= 1e-12 * pmax(g$p, 1e-3)))
qf_inf <- list(p = I(c(0.5, 0.05)), df1 = I(c(4, 8)), lower = I(qf(c(0.5, 0.05), c(4, 8), Inf)))

bonferroni_n <- c(15, 50, 272, 1000, 1e6)
bonferroni <- list(n = I(bonferroni_n), df = I(c(4, 4, 5, 8, 8)),
                   t = I(qt(0.05 / (2 * bonferroni_n), bonferroni_n - c(4, 4, 5, 8, 8) - 1, lower.tail = FALSE)),
                   z = I(qnorm(0.05 / (2 * bonferroni_n), lower.tail = FALSE)))

cases <- list(
  lm_case("cars", 2), lm_case("cars", 4), lm_case("women", 4), lm_case("faithful", 5),
  lm_case("mcycle", 9), lm_case("hills", 2), lm_case("hills", 3), lm_case("stackloss", 3)
)
glm_cases <- list(glm_case("discoveries", 4), glm_case("discoveries", 6))

out <- list(
  generatedBy = "test/reference/r/influence.R",
  rVersion = R.version.string,
  datasets = datasets,
  qf = qf_grid, qfInfinite = qf_inf, bonferroni = bonferroni,
  lm = cases, glm = glm_cases
)
writeLines(to_json(out), out_path)
cat("wrote", out_path, "\n")
