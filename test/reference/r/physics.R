# Reference values for Poisson, binomial, robust and shape-constrained fits and for
# non-negative least squares.
#
# Run from the repository root:   Rscript test/reference/r/physics.R
# Writes:                         test/reference/fixtures/physics.json
# Needs:                          R >= 4.2 (stats, splines) and MASS (Debian: r-base, r-cran-mass)
#
# Definitions (docs/design.md, "df"): df counts the intercept; the natural spline with df = k is
# ns(x, df = k - 1) plus an intercept (knots at type-7 quantiles of all x).
#
# glm:   glm(y ~ ns(x, df = k - 1), family = poisson | binomial), converged to machine
#        precision (glm.control(epsilon = 1e-15, maxit = 200)) so that an implementation
#        stopping at its own tolerance can be compared tightly. Binomial with trials uses
#        cbind(successes, trials - successes); 0/1 outcomes a 0/1 vector.
# rlm:   MASS::rlm(y ~ ns(x, df = k - 1), psi = psi.huber) with its defaults (k = 1.345,
#        scale.est = "MAD", initial least squares) but acc = 1e-13, maxit = 1000 so the
#        iteration reaches its fixed point; standard errors as summary.rlm (method "XtX").
# shape: least squares over natural splines (B-spline basis on the clamped knot vector of
#        ns, natural boundary conditions f''(a) = f''(b) = 0) subject to linear inequalities
#        on the B-spline coefficients theta: increasing diff(theta) >= 0, decreasing
#        diff(theta) <= 0, nonnegative theta >= 0, convex / concave f''(knot) >= 0 / <= 0
#        at every knot (f'' is piecewise linear, so these are exact). Solved by brute force:
#        every subset S of the inequalities is imposed as equalities, the least-squares fit
#        on the remaining null space is computed with lm.fit, and the feasible fit with the
#        smallest residual sum of squares is the constrained optimum (the optimum solves the
#        equality problem of its own active set, and no feasible point does better).
#        Poisson and binomial fits with a shape on the linear predictor: the same enumeration
#        with glm.fit, keeping the feasible fit of smallest deviance.
# nnls:  min ||E x - f|| subject to x >= 0 by the same brute force over column subsets.
#
# Numbers are written with the shortest of 15, 16 or 17 significant digits that reads back to
# the identical double.

suppressPackageStartupMessages({
  library(splines)
  library(MASS)
})

out_path <- file.path("test", "reference", "fixtures", "physics.json")
if (!dir.exists(dirname(out_path))) dir.create(dirname(out_path), recursive = TRUE)

source(file.path("test", "reference", "r", "json.R"))

# ---- open datasets shipped with R --------------------------------------------------------
pima <- MASS::Pima.tr
aq <- na.omit(datasets::airquality[, c("Temp", "Ozone")])
datasets <- list(
  discoveries = list(source = "datasets::discoveries (numbers of great inventions and scientific discoveries per year, 1860-1959)",
                     x = as.numeric(time(discoveries)), y = as.numeric(discoveries), trials = NULL),
  quakes = list(source = "datasets::quakes (1000 Fiji earthquakes), mag -> stations reporting; tied x",
                x = as.numeric(quakes$mag), y = as.numeric(quakes$stations), trials = NULL),
  menarche = list(source = "MASS::menarche (Milicer & Szczotka 1966), Age -> Menarche out of Total girls",
                  x = as.numeric(menarche$Age), y = as.numeric(menarche$Menarche), trials = as.numeric(menarche$Total)),
  pima = list(source = "MASS::Pima.tr (Smith et al. 1988), plasma glucose -> diabetic (1) or not (0); tied x",
              x = as.numeric(pima$glu), y = as.numeric(pima$type == "Yes"), trials = NULL),
  mcycle = list(source = "MASS::mcycle (Silverman 1985), times -> accel; tied x",
                x = as.numeric(mcycle$times), y = as.numeric(mcycle$accel), trials = NULL),
  stackloss = list(source = "datasets::stackloss (Brownlee 1965), Air.Flow -> stack.loss; tied x",
                   x = as.numeric(stackloss$Air.Flow), y = as.numeric(stackloss$stack.loss), trials = NULL),
  cars = list(source = "datasets::cars (Ezekiel 1930), speed -> dist; tied x",
              x = as.numeric(cars$speed), y = as.numeric(cars$dist), trials = NULL),
  airquality = list(source = "datasets::airquality (New York 1973), complete rows of Temp -> Ozone; tied x",
                    x = as.numeric(aq$Temp), y = as.numeric(aq$Ozone), trials = NULL),
  boston = list(source = "MASS::Boston (Harrison & Rubinfeld 1978), lstat -> medv",
                x = as.numeric(Boston$lstat), y = as.numeric(Boston$medv), trials = NULL),
  loblolly = list(source = "datasets::Loblolly (Kung 1986), age -> height; tied x",
                  x = as.numeric(Loblolly$age), y = as.numeric(Loblolly$height), trials = NULL)
)

# 23 points over the data range plus one 10 % beyond each end (extrapolated).
grid_of <- function(x) {
  lo <- min(x); hi <- max(x); span <- hi - lo
  c(lo - 0.1 * span, seq(lo, hi, length.out = 23), hi + 0.1 * span)
}

knots_distinct <- function(x, k) {
  B <- ns(x, df = k - 1)
  all(diff(c(min(x), attr(B, "knots"), max(x))) > 0)
}

# ---- Poisson and binomial -----------------------------------------------------------------
glm_case <- function(name, outcome, k) {
  d <- datasets[[name]]
  x <- d$x
  stopifnot(knots_distinct(x, k))
  ctl <- glm.control(epsilon = 1e-15, maxit = 200)
  fit <- if (outcome == "poisson") {
    glm(d$y ~ ns(x, df = k - 1), family = poisson, control = ctl)
  } else if (!is.null(d$trials)) {
    s <- d$y; f <- d$trials - d$y
    glm(cbind(s, f) ~ ns(x, df = k - 1), family = binomial, control = ctl)
  } else {
    glm(d$y ~ ns(x, df = k - 1), family = binomial, control = ctl)
  }
  stopifnot(fit$converged, fit$rank == k)
  grid <- grid_of(x)
  pr <- predict(fit, newdata = data.frame(x = grid), type = "link", se.fit = TRUE)
  z <- qnorm(0.975)
  linkinv <- family(fit)$linkinv
  list(
    name = sprintf("%s %s df=%d", name, outcome, k),
    dataset = name, outcome = outcome, df = k,
    rCall = sprintf("glm(%s ~ ns(x, df = %d), family = %s)", if (is.null(d$trials)) "y" else "cbind(y, trials - y)", k - 1, outcome),
    fitted = I(as.numeric(fitted(fit))),
    linearPredictor = I(as.numeric(fit$linear.predictors)),
    deviance = deviance(fit),
    nullDeviance = fit$null.deviance,
    aic = AIC(fit),
    bic = BIC(fit),
    logLik = as.numeric(logLik(fit)),
    hat = I(as.numeric(hatvalues(fit))),
    cooks = I(as.numeric(cooks.distance(fit))),
    pearsonResiduals = I(as.numeric(residuals(fit, type = "pearson"))),
    devianceResiduals = I(as.numeric(residuals(fit, type = "deviance"))),
    pearsonChi2 = sum(residuals(fit, type = "pearson")^2),
    grid = I(grid),
    linkFit = I(as.numeric(pr$fit)),
    linkSe = I(as.numeric(pr$se.fit)),
    ciLower = I(as.numeric(linkinv(pr$fit - z * pr$se.fit))),
    ciUpper = I(as.numeric(linkinv(pr$fit + z * pr$se.fit)))
  )
}

glm_cases <- list(
  glm_case("discoveries", "poisson", 3),
  glm_case("discoveries", "poisson", 5),
  glm_case("discoveries", "poisson", 7),
  glm_case("quakes", "poisson", 4),
  glm_case("quakes", "poisson", 6),
  glm_case("menarche", "binomial", 3),
  glm_case("menarche", "binomial", 5),
  glm_case("pima", "binomial", 3),
  glm_case("pima", "binomial", 5)
)

# ---- Huber M-estimation ----------------------------------------------------------------------
rlm_case <- function(name, k) {
  d <- datasets[[name]]
  x <- d$x; y <- d$y
  stopifnot(knots_distinct(x, k))
  fit <- rlm(y ~ ns(x, df = k - 1), psi = psi.huber, acc = 1e-13, maxit = 1000)
  stopifnot(fit$converged)
  V <- vcov(fit)  # summary.rlm, method "XtX"
  X <- model.matrix(fit)
  grid <- grid_of(x)
  Xg <- cbind(1, predict(ns(x, df = k - 1), grid))
  list(
    name = sprintf("%s huber df=%d", name, k),
    dataset = name, df = k,
    rCall = sprintf("MASS::rlm(y ~ ns(x, df = %d), psi = psi.huber, acc = 1e-13, maxit = 1000)", k - 1),
    fitted = I(as.numeric(fitted(fit))),
    weights = I(as.numeric(fit$w)),
    scale = fit$s,
    hat = I(as.numeric(hatvalues(fit))),
    grid = I(grid),
    gridFit = I(as.numeric(Xg %*% coef(fit))),
    gridSe = I(sqrt(rowSums((Xg %*% V) * Xg)))
  )
}

rlm_cases <- list(rlm_case("mcycle", 5), rlm_case("mcycle", 8), rlm_case("stackloss", 3), rlm_case("stackloss", 4))

# ---- shape-constrained natural splines by brute force ----------------------------------------
shape_rows <- function(t, shapes) {
  p <- length(t) - 4
  rows <- list()
  for (s in shapes) {
    if (s == "nonnegative") rows[[length(rows) + 1]] <- diag(p)
    if (s %in% c("increasing", "decreasing")) {
      D <- diff(diag(p))
      rows[[length(rows) + 1]] <- if (s == "increasing") D else -D
    }
    if (s %in% c("convex", "concave")) {
      kn <- unique(t)
      D2 <- splineDesign(t, kn, ord = 4, derivs = rep(2, length(kn)))
      rows[[length(rows) + 1]] <- if (s == "convex") D2 else -D2
    }
  }
  do.call(rbind, rows)
}

shape_case <- function(name, k, shapes) {
  d <- datasets[[name]]
  x <- d$x; y <- d$y
  stopifnot(knots_distinct(x, k))
  B0 <- ns(x, df = k - 1)
  a <- min(x); b <- max(x)
  t <- c(rep(a, 4), attr(B0, "knots"), rep(b, 4))
  B <- splineDesign(t, x, ord = 4)
  C <- splineDesign(t, c(a, b), ord = 4, derivs = c(2, 2))
  A <- shape_rows(t, shapes)
  r <- nrow(A)
  best <- NULL
  for (mask in 0:(2^r - 1)) {
    S <- which(bitwAnd(mask, 2^(0:(r - 1))) > 0)
    E <- rbind(C, A[S, , drop = FALSE])
    N <- Null(t(E))
    if (ncol(N) == 0) next
    f <- lm.fit(B %*% N, y)
    if (f$rank < ncol(N)) next
    theta <- N %*% f$coefficients
    # Feasibility with a tolerance relative to the coefficients' size.
    if (any(A %*% theta < -1e-9 * max(abs(theta)))) next
    rss <- sum(f$residuals^2)
    if (is.null(best) || rss < best$rss - 1e-12 * rss) best <- list(rss = rss, theta = theta, S = S)
  }
  unconstrained <- lm.fit(B %*% Null(t(C)), y)
  xs <- seq(a, b, length.out = 201)
  list(
    name = sprintf("%s natural df=%d %s", name, k, paste(shapes, collapse = "+")),
    dataset = name, df = k, shape = I(shapes),
    constraints = r,
    fitted = I(as.numeric(B %*% best$theta)),
    rss = best$rss,
    unconstrainedRss = sum(unconstrained$residuals^2),
    coefficients = I(as.numeric(best$theta)),
    denseX = I(xs),
    denseFit = I(as.numeric(splineDesign(t, xs, ord = 4) %*% best$theta))
  )
}

shape_cases <- list(
  shape_case("cars", 5, "increasing"),
  shape_case("cars", 3, "nonnegative"),   # inactive: equals the unconstrained fit
  shape_case("cars", 2, "nonnegative"),   # the least-squares line is negative at speed 4
  shape_case("airquality", 6, c("increasing", "nonnegative")),
  shape_case("boston", 6, c("decreasing", "convex")),
  shape_case("loblolly", 5, c("increasing", "concave"))
)

# Poisson / binomial with a shape on the linear predictor: the same enumeration with glm
# on the null-space design (the B-splines sum to 1, so it holds the intercept); the feasible
# fit with the smallest deviance is the constrained maximum-likelihood fit.
glm_shape_case <- function(name, outcome, k, shapes) {
  d <- datasets[[name]]
  x <- d$x; y <- d$y
  stopifnot(knots_distinct(x, k))
  B0 <- ns(x, df = k - 1)
  a <- min(x); b <- max(x)
  t <- c(rep(a, 4), attr(B0, "knots"), rep(b, 4))
  B <- splineDesign(t, x, ord = 4)
  C <- splineDesign(t, c(a, b), ord = 4, derivs = c(2, 2))
  A <- shape_rows(t, shapes)
  r <- nrow(A)
  fam <- if (outcome == "poisson") poisson() else binomial()
  ctl <- glm.control(epsilon = 1e-15, maxit = 200)
  best <- NULL
  for (mask in 0:(2^r - 1)) {
    S <- which(bitwAnd(mask, 2^(0:(r - 1))) > 0)
    N <- Null(t(rbind(C, A[S, , drop = FALSE])))
    if (ncol(N) == 0) next
    X <- B %*% N
    f <- suppressWarnings(glm.fit(X, y, family = fam, control = ctl, intercept = FALSE))
    if (!f$converged || f$rank < ncol(N)) next
    theta <- N %*% f$coefficients
    if (any(A %*% theta < -1e-9 * max(abs(theta)))) next
    if (is.null(best) || f$deviance < best$deviance - 1e-12 * f$deviance) best <- list(deviance = f$deviance, theta = theta, fitted = f$fitted.values)
  }
  unconstrained <- glm.fit(B %*% Null(t(C)), y, family = fam, control = ctl, intercept = FALSE)
  list(
    name = sprintf("%s %s natural df=%d %s", name, outcome, k, paste(shapes, collapse = "+")),
    dataset = name, outcome = outcome, df = k, shape = I(shapes),
    fitted = I(as.numeric(best$fitted)),
    deviance = best$deviance,
    unconstrainedDeviance = unconstrained$deviance,
    coefficients = I(as.numeric(best$theta))
  )
}

glm_shape_cases <- list(
  glm_shape_case("discoveries", "poisson", 5, "increasing"),
  glm_shape_case("discoveries", "poisson", 6, "concave"),
  glm_shape_case("pima", "binomial", 6, "increasing")
)

# ---- non-negative least squares by brute force ---------------------------------------------
nnls_brute <- function(E, f) {
  n <- ncol(E)
  best <- list(x = rep(0, n), rss = sum(f^2))
  for (mask in 1:(2^n - 1)) {
    P <- which(bitwAnd(mask, 2^(0:(n - 1))) > 0)
    if (length(P) > nrow(E)) next
    fit <- lm.fit(E[, P, drop = FALSE], f)
    if (fit$rank < length(P) || any(fit$coefficients <= 0)) next
    rss <- sum(fit$residuals^2)
    if (rss < best$rss) {
      x <- rep(0, n); x[P] <- fit$coefficients
      best <- list(x = x, rss = rss)
    }
  }
  best
}

longley_e <- cbind(1, scale(as.matrix(longley[, 1:6])))
nnls_case <- function(name, source, E, f) {
  b <- nnls_brute(E, f)
  list(name = name, source = source, m = nrow(E), n = ncol(E), E = I(as.numeric(t(E))), f = I(f), x = I(b$x), residualNorm = sqrt(b$rss))
}
nnls_cases <- list(
  nnls_case("longley", "datasets::longley (Longley 1967): Employed on an intercept and the 6 standardised predictors",
            longley_e, as.numeric(longley$Employed)),
  nnls_case("longley centred", "datasets::longley: centred Employed on the 6 standardised predictors (some coefficients pinned at 0)",
            longley_e[, -1], as.numeric(longley$Employed - mean(longley$Employed))),
  nnls_case("longley first 5 years", "datasets::longley, years 1947-1951 only: 5 equations, 7 unknowns (underdetermined)",
            longley_e[1:5, ], as.numeric(longley$Employed[1:5]))
)

# ---- discrete quantiles used by the Poisson and binomial prediction bands ---------------
quantile_cases <- list()
for (lambda in c(1e-3, 0.3, 2.5, 17, 1234.5)) for (p in c(0.025, 0.5, 0.975))
  quantile_cases[[length(quantile_cases) + 1]] <- list(kind = "poisson", p = p, lambda = lambda, trials = 0, prob = 0, q = qpois(p, lambda))
for (m in c(1, 10, 200)) for (prob in c(0.01, 0.3, 0.9)) for (p in c(0.025, 0.975))
  quantile_cases[[length(quantile_cases) + 1]] <- list(kind = "binomial", p = p, lambda = 0, trials = m, prob = prob, q = qbinom(p, m, prob))

data_out <- lapply(datasets, function(d) list(
  source = d$source, x = I(d$x), y = I(d$y), trials = if (is.null(d$trials)) NULL else I(d$trials)
))

doc <- list(
  generatedBy = "test/reference/r/physics.R",
  rVersion = R.version.string,
  massVersion = as.character(packageVersion("MASS")),
  datasets = data_out,
  glm = glm_cases,
  rlm = rlm_cases,
  shape = shape_cases,
  glmShape = glm_shape_cases,
  nnls = nnls_cases,
  quantiles = quantile_cases
)

writeLines(to_json(doc), out_path)
cat(sprintf("wrote %s: %d glm, %d rlm, %d shape, %d glm shape, %d nnls cases\n", out_path, length(glm_cases), length(rlm_cases), length(shape_cases), length(glm_shape_cases), length(nnls_cases)))
