# Reference values for the tensor-product natural cubic regression spline of two inputs
# (a surface, docs/design.md "Surfaces").
#
# Run from the repository root:   Rscript test/reference/r/surface.R
# Writes:                         test/reference/fixtures/surface.json
# Needs:                          R >= 4.2 (stats, splines, datasets)
#
# Definition (docs/design.md, "df", "Knots", "Surfaces"): for input u with df a the basis is
#   a = 1:  the constant 1
#   a >= 2: cbind(1, splines::ns(u, knots = K, Boundary.knots = range(u)))   (a columns)
# with K the a - 2 interior knots at type-7 quantiles j / (a - 1) of all u (over the distinct
# u when two of them coincide: the moved-knot rule, flagged in the case). The surface's model
# matrix is the row-wise product of the two inputs' bases: column (j, k) = U[, j] * V[, k],
# a * b columns whose span holds the intercept (1 x 1), fitted by lm(y ~ X - 1) with and
# without prior weights. The knots are passed to ns() explicitly, as the implementation
# places them.
#
# Datasets (open, shipped with R's datasets package):
#   airquality (New York, May-September 1973), Ozone ~ Temp x Wind, rows with NA dropped;
#   trees (Ryan, Joiner & Ryan 1976), Volume ~ Girth x Height.
# Weighted cases use deterministic prior weights (named per case).
#
# Exact leave-one-out RMSE is computed by brute force (refit without each row, the basis of
# the full data kept), an independent route from the hat-matrix formula.

suppressPackageStartupMessages(library(splines))

out_path <- file.path("test", "reference", "fixtures", "surface.json")
if (!dir.exists(dirname(out_path))) dir.create(dirname(out_path), recursive = TRUE)

source(file.path("test", "reference", "r", "json.R"))

aq <- airquality[complete.cases(airquality[, c("Ozone", "Temp", "Wind")]), ]
datasets <- list(
  airquality = list(
    source = "datasets::airquality (New York, May-September 1973), Ozone ~ Temp x Wind, NA rows dropped",
    uName = "Temp", vName = "Wind", yName = "Ozone",
    u = as.numeric(aq$Temp), v = as.numeric(aq$Wind), y = as.numeric(aq$Ozone), w = NULL
  ),
  airquality_w = list(
    source = "datasets::airquality, Ozone ~ Temp x Wind, NA rows dropped, prior weights w = 1 / Temp (deterministic)",
    uName = "Temp", vName = "Wind", yName = "Ozone",
    u = as.numeric(aq$Temp), v = as.numeric(aq$Wind), y = as.numeric(aq$Ozone), w = 1 / as.numeric(aq$Temp)
  ),
  trees = list(
    source = "datasets::trees (Ryan, Joiner & Ryan 1976), Volume ~ Girth x Height",
    uName = "Girth", vName = "Height", yName = "Volume",
    u = as.numeric(trees$Girth), v = as.numeric(trees$Height), y = as.numeric(trees$Volume), w = NULL
  ),
  trees_w = list(
    source = "datasets::trees, Volume ~ Girth x Height, prior weights w = 1 / Girth^2 (deterministic)",
    uName = "Girth", vName = "Height", yName = "Volume",
    u = as.numeric(trees$Girth), v = as.numeric(trees$Height), y = as.numeric(trees$Volume), w = 1 / as.numeric(trees$Girth)^2
  )
)

pairs <- list(
  airquality = list(c(1, 1), c(2, 2), c(3, 3), c(4, 3), c(5, 4), c(1, 4), c(4, 1), c(6, 5)),
  airquality_w = list(c(2, 2), c(4, 3), c(5, 4)),
  trees = list(c(2, 2), c(3, 2), c(3, 3), c(4, 3), c(2, 1)),
  trees_w = list(c(2, 2), c(3, 3))
)
level_main <- 0.95
level_alt <- 0.90

# Knots of one input with df a (docs/design.md, "Knots"), with the moved-knot rule.
place_knots <- function(x, a) {
  if (a < 2) return(list(interior = numeric(0), boundary = numeric(0), moved = FALSE))
  probs <- seq_len(a - 2) / (a - 1)
  b <- range(x)
  k <- as.numeric(quantile(x, probs, type = 7, names = FALSE))
  distinct <- function(k) all(diff(c(b[1], k, b[2])) > 0)
  moved <- FALSE
  if (length(k) > 0 && !distinct(k)) {
    k <- as.numeric(quantile(sort(unique(x)), probs, type = 7, names = FALSE))
    moved <- TRUE
    stopifnot(distinct(k))
  }
  list(interior = k, boundary = b, moved = moved)
}

# Basis of one input at points x, with knots placed on the data (linear beyond the boundary
# knots, which is what ns() does outside Boundary.knots).
axis_basis <- function(x, a, kn) {
  if (a == 1) return(matrix(1, length(x), 1))
  cbind(1, unclass(ns(x, knots = kn$interior, Boundary.knots = kn$boundary))[, , drop = FALSE])
}

# Row-wise product: column (j - 1) * ncol(V) + k is U[, j] * V[, k].
row_product <- function(U, V) {
  out <- matrix(0, nrow(U), ncol(U) * ncol(V))
  for (j in seq_len(ncol(U))) for (k in seq_len(ncol(V))) out[, (j - 1) * ncol(V) + k] <- U[, j] * V[, k]
  out
}

loo_rmse_bruteforce <- function(X, y, w) {
  n <- length(y)
  ww <- if (is.null(w)) rep(1, n) else w
  e <- numeric(n)
  for (i in seq_len(n)) {
    keep <- seq_len(n) != i
    f <- lm.wfit(X[keep, , drop = FALSE], y[keep], ww[keep])
    if (f$rank < ncol(X)) stop("rank-deficient leave-one-out refit at row ", i)
    e[i] <- y[i] - sum(X[i, ] * f$coefficients)
  }
  sqrt(sum(ww * e^2) / sum(ww))
}

make_case <- function(name, d, a, b) {
  u <- d$u; v <- d$v; y <- d$y; w <- d$w
  n <- length(y)
  ku <- place_knots(u, a)
  kv <- place_knots(v, b)
  X <- row_product(axis_basis(u, a, ku), axis_basis(v, b, kv))
  frame <- data.frame(y = y)
  frame$X <- X
  fit <- if (is.null(w)) lm(y ~ X - 1, data = frame) else { frame$w <- w; lm(y ~ X - 1, data = frame, weights = w) }
  stopifnot(fit$rank == a * b)
  ww <- if (is.null(w)) rep(1, n) else w
  rss <- sum(ww * residuals(fit)^2)
  ybar <- sum(ww * y) / sum(ww)

  # Off-data points: a 3 x 3 lattice at 10 %, 50 % and 90 % of each input's range, and two
  # points beyond the data (15 % below the smallest u, 15 % above the largest v).
  su <- diff(range(u)); sv <- diff(range(v))
  lat <- expand.grid(pu = min(u) + c(0.1, 0.5, 0.9) * su, pv = min(v) + c(0.1, 0.5, 0.9) * sv)
  pu <- c(lat$pu, min(u) - 0.15 * su, min(u) + 0.3 * su)
  pv <- c(lat$pv, min(v) + 0.4 * sv, max(v) + 0.15 * sv)
  nd <- data.frame(y = 0)[rep(1, length(pu)), , drop = FALSE]
  nd$X <- row_product(axis_basis(pu, a, ku), axis_basis(pv, b, kv))
  # predict() takes a new reading of a weighted fit to have weight 1 (its default, the
  # convention of the prediction band here); it warns about that, so quiet it.
  pc <- suppressWarnings(predict(fit, nd, interval = "confidence", level = level_main, se.fit = TRUE))
  pp <- suppressWarnings(predict(fit, nd, interval = "prediction", level = level_main))
  pc90 <- suppressWarnings(predict(fit, nd, interval = "confidence", level = level_alt))
  pp90 <- suppressWarnings(predict(fit, nd, interval = "prediction", level = level_alt))

  list(
    name = sprintf("%s df %d x %d", name, a, b),
    dataset = name,
    dfU = a,
    dfV = b,
    rCall = sprintf("lm(y ~ X - 1%s), X the row-wise product of cbind(1, ns(%s, knots, Boundary.knots)) and cbind(1, ns(%s, ...))",
      if (is.null(w)) "" else ", weights = w", d$uName, d$vName),
    n = n,
    residualDf = fit$df.residual,
    knotsMoved = ku$moved || kv$moved,
    knotsU = I(if (a >= 2) c(ku$boundary[1], ku$interior, ku$boundary[2]) else numeric(0)),
    knotsV = I(if (b >= 2) c(kv$boundary[1], kv$interior, kv$boundary[2]) else numeric(0)),
    fitted = I(as.numeric(fitted(fit))),
    residuals = I(as.numeric(residuals(fit))),
    hat = I(as.numeric(hatvalues(fit))),
    cooks = I(as.numeric(cooks.distance(fit))),
    rss = rss,
    sigma = summary(fit)$sigma,
    rSquared = 1 - rss / sum(ww * (y - ybar)^2),
    logLik = as.numeric(logLik(fit)),
    aic = AIC(fit),
    bic = BIC(fit),
    looRmse = loo_rmse_bruteforce(X, y, w),
    gcv = (rss / n) / (1 - a * b / n)^2,
    pointsU = I(pu),
    pointsV = I(pv),
    extrapolated = I(as.integer(pu < min(u) | pu > max(u) | pv < min(v) | pv > max(v))),
    predFit = I(as.numeric(pc$fit[, "fit"])),
    predSe = I(as.numeric(pc$se.fit)),
    ciLower = I(as.numeric(pc$fit[, "lwr"])),
    ciUpper = I(as.numeric(pc$fit[, "upr"])),
    piLower = I(as.numeric(pp[, "lwr"])),
    piUpper = I(as.numeric(pp[, "upr"])),
    ci90Lower = I(as.numeric(pc90[, "lwr"])),
    ci90Upper = I(as.numeric(pc90[, "upr"])),
    pi90Lower = I(as.numeric(pp90[, "lwr"])),
    pi90Upper = I(as.numeric(pp90[, "upr"]))
  )
}

cases <- list()
for (name in names(pairs)) {
  for (ab in pairs[[name]]) cases[[length(cases) + 1]] <- make_case(name, datasets[[name]], ab[1], ab[2])
}

data_out <- lapply(datasets, function(d) list(
  source = d$source, uName = d$uName, vName = d$vName, yName = d$yName,
  u = I(d$u), v = I(d$v), y = I(d$y), w = if (is.null(d$w)) NULL else I(d$w)
))

doc <- list(
  generatedBy = "test/reference/r/surface.R",
  rVersion = R.version.string,
  levels = list(main = level_main, alt = level_alt),
  datasets = data_out,
  cases = cases
)

writeLines(to_json(doc), out_path)
cat(sprintf("wrote %s: %d cases\n", out_path, length(cases)))
moved <- Filter(function(c) c$knotsMoved, cases)
if (length(moved) > 0) cat("cases with moved knots:", paste(vapply(moved, function(c) c$name, ""), collapse = "; "), "\n")
