# Reference values for the cubic smoothing spline (family 'smooth').
#
# Run from the repository root:   Rscript test/reference/r/smooth.R
# Writes:                         test/reference/fixtures/smooth.json
# Needs:                          R >= 4.2 (stats), MASS and jsonlite
#                                 (Debian: r-base, r-cran-mass, r-cran-jsonlite)
#
# Reference: stats::smooth.spline(x, y, w, all.knots = TRUE, df = k), which minimises
# sum w_i (y_i - f(x_i))^2 + lambda * integral f''^2 over cubic splines with a knot at every
# distinct x (B-spline basis, exact penalty), i.e. the definition in docs/design.md ("Cubic smoothing spline"). R matches
# the asked df only approximately (it searches its own smoothing parameter 'spar'), so the
# achieved trace fit$df (= sum(fit$lev)) is recorded and the test fits at that df.
#
# Recorded per case: R's achieved df, R's lambda (R's own scaling of x and weights, kept for
# information only), the distinct x with R's pooled weights and leverages (fit$x, fit$w,
# fit$lev), fitted values at every row's x, and predictions on a grid inside the data range.
#
# smooth.spline builds its penalty matrix (auxM$Sigma with keep.stuff = TRUE) with an
# approximation that differs from the exact integral of B_j'' B_l'' by up to about 0.5 %
# (recorded per case as penaltyRelDiff), which moves its fit by up to ~1e-4 of the scale of y.
# So each case also carries an exact dense evaluation of the same definition built from
# splines::splineDesign: B-spline design on the clamped knots at all distinct x, penalty
# integrated exactly (B'' is linear on each knot interval, so 2-point Gauss-Legendre is
# exact), lambda solved (uniroot on log lambda) for trace(A^-1 X'WX) = R's df, then the
# coefficients A^-1 X'Wy, leverages, predictions (linear beyond the data range, as
# predict.smooth.spline) and the variance factor b(x)' A^-1 b(x).
# Numbers are written with 15 significant digits (jsonlite, digits = NA).

suppressPackageStartupMessages({
  library(splines)
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

# ---- exact dense evaluation of the definition -------------------------------------------
# x is mapped to t = (x - min) / range; lambda for t times range^3 is lambda for x.
exact_setup <- function(x, y, w) {
  ux <- sort(unique(x))
  W <- as.numeric(tapply(w, x, sum)[as.character(ux)])
  ybar <- as.numeric(tapply(w * y, x, sum)[as.character(ux)]) / W
  lo <- ux[1]
  s <- ux[length(ux)] - lo
  t <- (ux - lo) / s
  knots <- c(rep(0, 3), t, rep(1, 3))
  X <- splineDesign(knots, t, ord = 4)
  nb <- ncol(X)
  Om <- matrix(0, nb, nb)
  g <- 0.5 / sqrt(3)
  for (k in seq_len(length(t) - 1)) {
    h <- t[k + 1] - t[k]
    B2 <- splineDesign(knots, t[k] + c(0.5 - g, 0.5 + g) * h, ord = 4, derivs = 2)
    Om <- Om + 0.5 * h * crossprod(B2)
  }
  G <- crossprod(X, W * X)
  list(ux = ux, W = W, ybar = ybar, lo = lo, s = s, t = t, knots = knots, X = X, Om = Om, G = G)
}

# `near` is R's lambda converted to the pooled weights used here (R rescales w to mean 1);
# the exact root lies within a few percent of it, so the bracket keeps A well conditioned.
exact_fit <- function(e, df, grid, near) {
  tr <- function(l) sum(diag(solve(e$G + exp(l) * e$Om, e$G)))
  root <- uniroot(function(l) tr(l) - df, log(near) + c(-1, 1), tol = 1e-13, maxiter = 1000)$root
  stopifnot(abs(tr(root) - df) < 1e-9)
  A <- e$G + exp(root) * e$Om
  Ainv <- solve(A)
  coef <- Ainv %*% crossprod(e$X, e$W * e$ybar)
  lev <- e$W * rowSums((e$X %*% Ainv) * e$X)
  # basis rows at the grid, continued linearly beyond the data range
  tg <- (grid - e$lo) / e$s
  inside <- pmin(pmax(tg, 0), 1)
  B <- splineDesign(e$knots, inside, ord = 4)
  B1 <- splineDesign(e$knots, inside, ord = 4, derivs = 1)
  B <- B + (tg - inside) * B1
  list(
    lambda = exp(root) * e$s^3,
    coefficients = I(as.numeric(coef)),
    fittedDistinct = I(as.numeric(e$X %*% coef)),
    lev = I(lev),
    grid = I(grid),
    predicted = I(as.numeric(B %*% coef)),
    varianceFactor = I(rowSums((B %*% Ainv) * B))
  )
}

cases <- list()
for (name in names(asked)) {
  d <- datasets[[name]]
  w <- if (is.null(d$w)) rep(1, length(d$x)) else d$w
  grid <- seq(min(d$x), max(d$x), length.out = 41)
  span <- max(d$x) - min(d$x)
  grid_out <- c(min(d$x) - 0.2 * span, min(d$x) - 0.01 * span, grid, max(d$x) + 0.01 * span, max(d$x) + 0.2 * span)
  e <- exact_setup(d$x, d$y, w)
  for (k in asked[[name]]) {
    fit <- smooth.spline(d$x, d$y, w = w, all.knots = TRUE, df = k, keep.stuff = TRUE)
    stopifnot(length(fit$x) == length(unique(d$x)))
    nb <- ncol(e$X)
    sigma_diag <- fit$auxM$Sigma[1:nb]
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
      predicted = I(predict(fit, grid)$y),
      penaltyRelDiff = max(abs(sigma_diag - diag(e$Om)) / abs(diag(e$Om))),
      exact = exact_fit(e, fit$df, grid_out, fit$lambda * sum(w) / length(w))
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
