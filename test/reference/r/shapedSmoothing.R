# Reference values for the shape-constrained cubic smoothing spline (core/fit/shapedSmoothing/).
#
# Run from anywhere:   Rscript test/reference/r/shapedSmoothing.R
# Writes:              test/reference/fixtures/shapedSmoothing.json (next to this script's folder)
# Needs:               R >= 4.2 (stats, splines) and quadprog (Debian: r-cran-quadprog)
#
# The same penalised problem is built here from scratch and solved by a different algorithm:
#
#   minimise  sum_i w_i (y_i - b(x_i)' theta)^2 + lambda theta' Omega theta
#   subject to  A theta >= 0,
#
# b the cubic B-splines on the clamped knot vector with every distinct x as a knot
# (splines::splineDesign), Omega_jl = integral B_j'' B_l'' by 2-point Gauss-Legendre on each
# knot interval (exact: the integrand is a product of two linear functions), A the shape rows:
# differences of neighbouring coefficients (increasing / decreasing), the coefficients
# (nonnegative), f'' at every knot (convex / concave; splineDesign with derivs = 2, the same
# feasible set as the divided differences the implementation uses). The quadratic program is
# solved by quadprog::solve.QP, the dual active-set method of Goldfarb & Idnani (1983), "A
# numerically stable dual method for solving strictly convex quadratic programs",
# Mathematical Programming 27, 1-33, on the normal equations (well conditioned at these sizes).
#
# lambda is the one at which the unconstrained fit has hat-matrix trace df, found here by a
# root search on the trace of solve(X'WX + lambda Omega, X'WX) (x scaled to [0, 1] for the
# bracket, reported in units of x). df = 2 is the straight line (lambda = infinity, written
# as null): the problem is solved on the two coefficients of a line, theta = Z beta,
# Z = [1, Greville abscissae].
#
# Bands: covariance with the active constraints held as equalities,
# V = H - H A_a'(A_a H A_a')^+ A_a H, H = (X'WX + lambda Omega)^-1 (or its line analogue),
# leverage h_i = w_i b(x_i)' V b(x_i), effectiveDf = sum of the leverages. A constraint counts
# as active when its Lagrange multiplier exceeds 1e-9 times the largest.
#
# Data: R's built-in open datasets cars, Puromycin (treated), airquality (complete Ozone and
# Wind), pressure and trees, in their original row order.

suppressPackageStartupMessages({
  library(splines)
  library(quadprog)
})

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
here <- if (length(script) == 1) dirname(normalizePath(script)) else file.path(getwd(), "test", "reference", "r")
out_path <- file.path(here, "..", "fixtures", "shapedSmoothing.json")

options(fixture.allow_null = TRUE)
source(file.path("test", "reference", "r", "json.R"))
arr <- function(v) I(as.vector(v))

# ---- the penalised problem -----------------------------------------------------------------
setup <- function(x, y, w) {
  u <- sort(unique(x))
  m <- length(u)
  knots <- c(rep(u[1], 4), u[-c(1, m)], rep(u[m], 4))
  p <- m + 2
  X <- splineDesign(knots, x, ord = 4, outer.ok = TRUE)
  gl <- c(-1, 1) / sqrt(3)
  Om <- matrix(0, p, p)
  for (j in 1:(m - 1)) {
    a <- u[j]
    b <- u[j + 1]
    tt <- (a + b) / 2 + (b - a) / 2 * gl
    D2 <- splineDesign(knots, tt, ord = 4, derivs = c(2, 2))
    Om <- Om + (b - a) / 2 * crossprod(D2)
  }
  list(u = u, m = m, p = p, knots = knots, X = X, w = w, y = y, Om = Om,
       XtWX = crossprod(X, w * X), XtWy = crossprod(X, w * y))
}

trace_at <- function(s, lam) sum(diag(solve(s$XtWX + lam * s$Om, s$XtWX)))

lambda_for <- function(s, df) {
  r3 <- diff(range(s$u))^3
  r3 * exp(uniroot(function(r) trace_at(s, r3 * exp(r)) - df, c(-25, 12), tol = 1e-14)$root)
}

shape_rows <- function(s, shapes) {
  A <- NULL
  p <- s$p
  for (sh in shapes) {
    if (sh %in% c("increasing", "decreasing")) {
      D <- diff(diag(p))
      A <- rbind(A, if (sh == "increasing") D else -D)
    }
    if (sh == "nonnegative") A <- rbind(A, diag(p))
    if (sh %in% c("convex", "concave")) {
      D2 <- splineDesign(s$knots, s$u, ord = 4, derivs = rep(2, s$m))
      A <- rbind(A, if (sh == "convex") D2 else -D2)
    }
  }
  A
}

# Solves on theta = Z beta (Z = identity, or the line basis), returns theta and the bands.
solve_case <- function(s, A, lam) {
  line <- !is.finite(lam)
  greville <- (s$knots[2:(s$p + 1)] + s$knots[3:(s$p + 2)] + s$knots[4:(s$p + 3)]) / 3
  Z <- if (line) cbind(1, greville - mean(range(s$u))) else diag(s$p)
  G <- t(Z) %*% (if (line) s$XtWX else s$XtWX + lam * s$Om) %*% Z
  g <- t(Z) %*% s$XtWy
  AZ <- A %*% Z
  sol <- solve.QP(G, g, t(AZ), rep(0, nrow(AZ)))
  theta <- as.vector(Z %*% sol$solution)
  mult <- sol$Lagrangian
  active <- which(mult > 1e-9 * max(mult))
  H <- solve(G)
  V <- H
  rank <- 0
  if (length(active) > 0) {
    Aa <- AZ[active, , drop = FALSE]
    S <- Aa %*% H %*% t(Aa)
    e <- eigen(S, symmetric = TRUE)
    keep <- e$values > 1e-10 * max(e$values)
    rank <- sum(keep)
    Sp <- e$vectors[, keep, drop = FALSE] %*% diag(1 / e$values[keep], rank) %*% t(e$vectors[, keep, drop = FALSE])
    V <- H - H %*% t(Aa) %*% Sp %*% Aa %*% H
  }
  XZ <- s$X %*% Z
  leverage <- s$w * rowSums((XZ %*% V) * XZ)
  list(theta = theta, fitted = as.vector(s$X %*% theta), active = active, rank = rank,
       leverage = leverage, objective = sum(s$w * (s$y - s$X %*% theta)^2) + (if (line) 0 else lam * sum(theta * (s$Om %*% theta))))
}

aq <- airquality[complete.cases(airquality[, c("Ozone", "Wind")]), ]
pu <- Puromycin[Puromycin$state == "treated", ]
cases <- list(
  list(name = "cars increasing df 8", source = "datasets::cars, speed -> dist; tied x",
       x = cars$speed, y = cars$dist, w = NULL, shapes = c("increasing"), df = 8),
  list(name = "cars increasing, convex df 6", source = "datasets::cars, speed -> dist; tied x",
       x = cars$speed, y = cars$dist, w = NULL, shapes = c("increasing", "convex"), df = 6),
  list(name = "cars weighted increasing df 8", source = "datasets::cars, speed -> dist, prior weights 1 / speed",
       x = cars$speed, y = cars$dist, w = 1 / cars$speed, shapes = c("increasing"), df = 8),
  list(name = "Puromycin increasing, concave df 5", source = "datasets::Puromycin (treated), conc -> rate; tied x",
       x = pu$conc, y = pu$rate, w = NULL, shapes = c("increasing", "concave"), df = 5),
  list(name = "airquality decreasing, nonnegative df 6", source = "datasets::airquality (complete Ozone, Wind), Wind -> Ozone; tied x",
       x = aq$Wind, y = aq$Ozone, w = NULL, shapes = c("decreasing", "nonnegative"), df = 6),
  list(name = "airquality nonnegative df 2 (line)", source = "datasets::airquality (complete Ozone, Wind), Wind -> Ozone; tied x",
       x = aq$Wind, y = aq$Ozone, w = NULL, shapes = c("nonnegative"), df = 2),
  list(name = "cars decreasing df 2 (line)", source = "datasets::cars, speed -> dist; tied x",
       x = cars$speed, y = cars$dist, w = NULL, shapes = c("decreasing"), df = 2),
  list(name = "pressure increasing, convex df 4", source = "datasets::pressure, temperature -> pressure",
       x = pressure$temperature, y = pressure$pressure, w = NULL, shapes = c("increasing", "convex"), df = 4),
  list(name = "trees increasing, convex df 6", source = "datasets::trees, Girth -> Volume; tied x",
       x = trees$Girth, y = trees$Volume, w = NULL, shapes = c("increasing", "convex"), df = 6)
)

out <- lapply(cases, function(cs) {
  x <- as.numeric(cs$x)
  y <- as.numeric(cs$y)
  w <- if (is.null(cs$w)) rep(1, length(x)) else as.numeric(cs$w)
  s <- setup(x, y, w)
  lam <- if (cs$df == 2) Inf else lambda_for(s, cs$df)
  A <- shape_rows(s, cs$shapes)
  r <- solve_case(s, A, lam)
  list(
    name = cs$name, source = cs$source,
    rCall = "quadprog::solve.QP(X'WX + lambda Omega, X'Wy, t(A), 0), splines::splineDesign basis",
    x = arr(x), y = arr(y), w = if (is.null(cs$w)) NULL else arr(w),
    shapes = arr(cs$shapes), df = cs$df, lambda = lam,
    rows = nrow(A), activeRows = arr(r$active - 1), rank = r$rank,
    coefficients = arr(r$theta), fitted = arr(r$fitted), leverage = arr(r$leverage),
    effectiveDf = sum(r$leverage), objective = r$objective
  )
})

writeLines(to_json(list(generatedBy = "test/reference/r/shapedSmoothing.R", rVersion = R.version.string,
                        quadprogVersion = as.character(packageVersion("quadprog")), cases = out)), out_path)
cat("wrote", normalizePath(out_path), "\n")
