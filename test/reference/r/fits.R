# Reference values for the natural cubic regression spline and orthogonal polynomial fits.
#
# Run from the repository root:   Rscript test/reference/r/fits.R
# Writes:                         test/reference/fixtures/fits.json
# Needs:                          R >= 4.2 (stats, splines) and MASS (Debian: r-base, r-cran-mass)
#
# Numbers are written with the shortest of 15, 16 or 17 significant digits that reads back to
# the identical double (jsonlite 1.8 stops at 15 digits, so a small writer is used instead).
#
# Definitions (docs/design.md, "df"): df counts the intercept.
#   natural, df = k  <=>  lm(y ~ splines::ns(x, df = k - 1))  (k - 2 interior knots at
#                         type-7 quantiles of all x, boundary knots at range(x), linear beyond)
#   poly,    df = k  <=>  lm(y ~ poly(x, k - 1))             (degree k - 1, orthogonal basis)
#
# Exact leave-one-out RMSE is computed here by brute force (refit without each row), an
# independent route from the hat-matrix formula the implementation uses. For ns the basis is
# built once on the full data and rows are dropped from the model matrix, so the knots stay
# those of the full data (the hat formula assumes a fixed basis). With prior weights w the
# LOO RMSE is sqrt(sum w e^2 / sum w), e_i = y_i - prediction of the fit without row i.

suppressPackageStartupMessages({
  library(splines)
  library(MASS)
})

out_path <- file.path("test", "reference", "fixtures", "fits.json")
if (!dir.exists(dirname(out_path))) dir.create(dirname(out_path), recursive = TRUE)

source(file.path("test", "reference", "r", "json.R"))

# ---- open datasets shipped with R --------------------------------------------------------
datasets <- list(
  mcycle = list(
    source = "MASS::mcycle (Silverman 1985, motorcycle crash test), times -> accel; tied x",
    x = as.numeric(MASS::mcycle$times), y = as.numeric(MASS::mcycle$accel), w = NULL
  ),
  cars = list(
    source = "datasets::cars (Ezekiel 1930), speed -> dist; tied x",
    x = as.numeric(cars$speed), y = as.numeric(cars$dist), w = NULL
  ),
  women = list(
    source = "datasets::women (McNeil 1977), height -> weight",
    x = as.numeric(women$height), y = as.numeric(women$weight), w = NULL
  ),
  pressure = list(
    source = "datasets::pressure (Weast 1973), temperature -> pressure; y spans 2e-4 .. 806",
    x = as.numeric(pressure$temperature), y = as.numeric(pressure$pressure), w = NULL
  ),
  # Weighted case: stopping distance spreads more at higher speed, so the deterministic
  # prior weights w = 1 / speed (variance taken proportional to speed) are used.
  cars_w = list(
    source = "datasets::cars, speed -> dist, prior weights w = 1 / speed (deterministic)",
    x = as.numeric(cars$speed), y = as.numeric(cars$dist), w = 1 / as.numeric(cars$speed)
  )
)

natural_df <- 2:8
poly_df <- 2:6
level_main <- 0.95
level_alt <- 0.90

# Model matrix of the family at df k, built on the full data (knots fixed by the full data).
basis_matrix <- function(family, x, k) {
  if (family == "natural") ns(x, df = k - 1) else poly(x, k - 1)
}

# Brute-force exact leave-one-out RMSE with the full-data basis (see header).
loo_rmse_bruteforce <- function(B, y, w) {
  n <- length(y)
  X <- cbind(1, unclass(B)[, , drop = FALSE])
  ww <- if (is.null(w)) rep(1, n) else w
  e <- numeric(n)
  for (i in seq_len(n)) {
    keep <- seq_len(n) != i
    f <- lm.wfit(X[keep, , drop = FALSE], y[keep], ww[keep])
    if (f$rank < ncol(X)) stop("rank-deficient leave-one-out refit at row ", i)
    beta <- f$coefficients
    e[i] <- y[i] - sum(X[i, ] * beta)
  }
  sqrt(sum(ww * e^2) / sum(ww))
}

make_case <- function(name, d, family, k) {
  x <- d$x
  y <- d$y
  w <- d$w
  n <- length(x)
  B <- basis_matrix(family, x, k)
  df_frame <- data.frame(x = x, y = y)
  fit <- if (family == "natural") {
    if (is.null(w)) lm(y ~ ns(x, df = k - 1), data = df_frame)
    else { df_frame$w <- w; lm(y ~ ns(x, df = k - 1), data = df_frame, weights = w) }
  } else {
    if (is.null(w)) lm(y ~ poly(x, k - 1), data = df_frame)
    else { df_frame$w <- w; lm(y ~ poly(x, k - 1), data = df_frame, weights = w) }
  }
  stopifnot(fit$rank == k)
  s <- summary(fit)
  ww <- if (is.null(w)) rep(1, n) else w
  rss <- sum(ww * residuals(fit)^2)

  lo <- min(x); hi <- max(x); span <- hi - lo
  # 23 points from min(x) to max(x) inclusive, plus one point 15 % of the range below and
  # one 15 % above the data (extrapolated: ns continues linearly there).
  grid <- c(lo - 0.15 * span, seq(lo, hi, length.out = 23), hi + 0.15 * span)
  nd <- data.frame(x = grid)
  # For a weighted fit, predict() takes the new reading to have weight 1 (its default),
  # which is the convention of the prediction band here; it warns about that, so quiet it.
  pc <- suppressWarnings(predict(fit, nd, interval = "confidence", level = level_main, se.fit = TRUE))
  pp <- suppressWarnings(predict(fit, nd, interval = "prediction", level = level_main, se.fit = TRUE))
  pc90 <- suppressWarnings(predict(fit, nd, interval = "confidence", level = level_alt))
  pp90 <- suppressWarnings(predict(fit, nd, interval = "prediction", level = level_alt))

  knots <- if (family == "natural") as.numeric(attr(B, "knots")) else numeric(0)
  bknots <- if (family == "natural") as.numeric(attr(B, "Boundary.knots")) else numeric(0)
  # docs/design.md ("Knots") moves coinciding quantile knots; such cases would not equal plain ns(), so
  # they are flagged (the test then checks only what does not depend on the knots).
  all_k <- c(bknots[1], knots, bknots[2])
  knots_distinct <- family != "natural" || all(diff(all_k) > 0)

  list(
    name = sprintf("%s %s df=%d", name, family, k),
    dataset = name,
    family = family,
    df = k,
    rCall = if (family == "natural")
      sprintf("lm(y ~ splines::ns(x, df = %d)%s)", k - 1, if (is.null(w)) "" else ", weights = w")
      else sprintf("lm(y ~ poly(x, %d)%s)", k - 1, if (is.null(w)) "" else ", weights = w"),
    n = n,
    residualDf = fit$df.residual,
    knotsDistinct = knots_distinct,
    interiorKnots = I(knots),
    boundaryKnots = I(bknots),
    fitted = I(as.numeric(fitted(fit))),
    residuals = I(as.numeric(residuals(fit))),
    hat = I(as.numeric(hatvalues(fit))),
    cooks = I(as.numeric(cooks.distance(fit))),
    rss = rss,
    sigma = s$sigma,
    rSquared = s$r.squared,
    logLik = as.numeric(logLik(fit)),
    aic = AIC(fit),
    bic = BIC(fit),
    looRmse = loo_rmse_bruteforce(B, y, w),
    gcv = (rss / n) / (1 - k / n)^2,
    grid = I(grid),
    extrapolated = I(as.integer(grid < lo | grid > hi)),
    predFit = I(as.numeric(pc$fit[, "fit"])),
    predSe = I(as.numeric(pc$se.fit)),
    ciLower = I(as.numeric(pc$fit[, "lwr"])),
    ciUpper = I(as.numeric(pc$fit[, "upr"])),
    piLower = I(as.numeric(pp$fit[, "lwr"])),
    piUpper = I(as.numeric(pp$fit[, "upr"])),
    ci90Lower = I(as.numeric(pc90[, "lwr"])),
    ci90Upper = I(as.numeric(pc90[, "upr"])),
    pi90Lower = I(as.numeric(pp90[, "lwr"])),
    pi90Upper = I(as.numeric(pp90[, "upr"]))
  )
}

cases <- list()
for (name in names(datasets)) {
  d <- datasets[[name]]
  for (k in natural_df) cases[[length(cases) + 1]] <- make_case(name, d, "natural", k)
  for (k in poly_df) cases[[length(cases) + 1]] <- make_case(name, d, "poly", k)
}

data_out <- lapply(datasets, function(d) list(
  source = d$source, x = I(d$x), y = I(d$y), w = if (is.null(d$w)) NULL else I(d$w)
))

doc <- list(
  generatedBy = "test/reference/r/fits.R",
  rVersion = R.version.string,
  levels = list(main = level_main, alt = level_alt),
  datasets = data_out,
  cases = cases
)

writeLines(to_json(doc), out_path)
cat(sprintf("wrote %s: %d cases\n", out_path, length(cases)))
flagged <- Filter(function(c) !c$knotsDistinct, cases)
if (length(flagged) > 0) cat("cases with coinciding quantile knots:", paste(vapply(flagged, function(c) c$name, ""), collapse = "; "), "\n")
