# Reference values for the residual diagnostics and distribution functions in core/stats.
#
# Run from the repository root:
#   Rscript test/reference/r/diagnostics.R
# It writes test/reference/fixtures/diagnostics.json, read by
# test/reference/diagnostics.test.ts. Needs R with the recommended packages 'MASS' and
# 'splines' and the package 'lmtest' (Debian: r-cran-lmtest, r-cran-mass). Uses jsonlite
# (Debian: r-cran-jsonlite) when it is installed, which writes 15 significant digits (its
# maximum); otherwise writes the JSON itself with 17 significant digits (sprintf "%.17g").
# Both give the same structure; the values differ by at most 5e-15 relative, far below the
# tolerances of the tests.
#
# Data: R's built-in open datasets (cars, women, faithful, pressure, trees, precip, rivers,
# quakes) and MASS::mcycle, each sorted by x (ties keep their original order).

suppressPackageStartupMessages({
  library(splines)
  library(MASS)
  library(lmtest)
})

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- if (length(script) == 1) normalizePath(file.path(dirname(script), "..", "..", "..")) else getwd()
out_file <- file.path(root, "test", "reference", "fixtures", "diagnostics.json")

arr <- function(v) I(as.vector(v)) # always a JSON array, even of length 1

# ---------------------------------------------------------------- JSON writer (fallback)
json_number <- function(v) {
  if (is.na(v) || !is.finite(v)) return("null")
  if (is.integer(v)) return(as.character(v))
  sprintf("%.17g", v)
}
json_string <- function(s) {
  s <- gsub("\\\\", "\\\\\\\\", s)
  s <- gsub("\"", "\\\\\"", s)
  paste0("\"", s, "\"")
}
to_json <- function(x) {
  if (is.null(x)) return("null")
  if (is.list(x)) {
    items <- vapply(x, to_json, character(1))
    if (!is.null(names(x))) {
      return(paste0("{", paste0(json_string(names(x)), ":", items, collapse = ","), "}"))
    }
    return(paste0("[", paste0(items, collapse = ","), "]"))
  }
  one <- if (is.character(x)) json_string else if (is.logical(x)) function(b) if (is.na(b)) "null" else if (b) "true" else "false" else json_number
  parts <- vapply(as.vector(x), one, character(1))
  if (inherits(x, "AsIs") || length(x) != 1) return(paste0("[", paste0(parts, collapse = ","), "]"))
  parts
}
write_json_file <- function(obj, path) {
  if (requireNamespace("jsonlite", quietly = TRUE)) {
    txt <- jsonlite::toJSON(obj, auto_unbox = TRUE, digits = I(17), null = "null", na = "null")
    writeLines(txt, path)
    return("jsonlite")
  }
  writeLines(to_json(obj), path)
  "hand-written JSON"
}

# ---------------------------------------------------------------- distribution functions
dist <- list()
qt_df <- c(1, 1.5, 2, 2.5, 3, 4.7, 7, 10, 25.3, 100, 1000, 1e5)
qt_p <- c(1e-12, 1e-8, 1e-4, 0.001, 0.01, 0.025, 0.05, 0.1, 0.3, 0.45, 0.6, 0.9, 0.975, 0.9999)
g <- expand.grid(p = qt_p, df = qt_df)
dist$qt <- list(p = arr(g$p), df = arr(g$df), lower = arr(qt(g$p, g$df)), upper = arr(qt(g$p, g$df, lower.tail = FALSE)))

pt_q <- c(-300, -50, -8, -3, -1.5, -0.5, -1e-3, 0, 0.2, 1, 2.5, 6, 30, 1000)
g <- expand.grid(q = pt_q, df = qt_df)
dist$pt <- list(q = arr(g$q), df = arr(g$df), lower = arr(pt(g$q, g$df)), upper = arr(pt(g$q, g$df, lower.tail = FALSE)))

chi_df <- c(0.5, 1, 2, 3.3, 10, 57, 300, 5000)
chi_q <- c(1e-4, 0.05, 0.5, 1, 2.7, 10, 40, 150, 600, 5500)
g <- expand.grid(q = chi_q, df = chi_df)
dist$pchisq <- list(q = arr(g$q), df = arr(g$df), lower = arr(pchisq(g$q, g$df)), upper = arr(pchisq(g$q, g$df, lower.tail = FALSE)))

g <- expand.grid(q = c(0.01, 0.3, 1, 2.2, 5, 30, 500), df1 = c(1, 2, 3.5, 10, 40), df2 = c(1, 2.5, 7, 30, 200, 1e4))
dist$pf <- list(q = arr(g$q), df1 = arr(g$df1), df2 = arr(g$df2), lower = arr(pf(g$q, g$df1, g$df2)), upper = arr(pf(g$q, g$df1, g$df2, lower.tail = FALSE)))

norm_q <- c(-37, -20, -8, -3, -1.2, -0.3, 0, 1e-8, 0.7, 2.5, 5, 9)
dist$pnorm <- list(q = arr(norm_q), lower = arr(pnorm(norm_q)), upper = arr(pnorm(norm_q, lower.tail = FALSE)))
norm_p <- c(1e-300, 1e-20, 1e-6, 0.01, 0.2, 0.5, 0.7, 0.975, 1 - 1e-10)
dist$qnorm <- list(p = arr(norm_p), lower = arr(qnorm(norm_p)), upper = arr(qnorm(norm_p, lower.tail = FALSE)))
lg_x <- c(1e-8, 0.1, 0.5, 1.5, 2.5, 3.7, 10, 15.2, 100.5, 1e4, 1e8)
dist$lgamma <- list(x = arr(lg_x), value = arr(lgamma(lg_x)))
g <- expand.grid(x = c(1e-5, 0.1, 0.5, 0.9, 0.99999), a = c(0.5, 2, 30, 4000), b = c(0.5, 3, 250))
dist$pbeta <- list(x = arr(g$x), a = arr(g$a), b = arr(g$b), lower = arr(pbeta(g$x, g$a, g$b)), upper = arr(pbeta(g$x, g$a, g$b, lower.tail = FALSE)))
g <- expand.grid(x = c(1e-3, 0.5, 2, 9, 45, 1100), a = c(0.5, 1, 4.5, 40, 1000))
dist$pgamma <- list(x = arr(g$x), a = arr(g$a), lower = arr(pgamma(g$x, g$a)), upper = arr(pgamma(g$x, g$a, lower.tail = FALSE)))

# ---------------------------------------------------------------- regression cases
fit_record <- function(fit, x, y) {
  X <- model.matrix(fit)
  n <- nrow(X)
  p <- ncol(X)
  r <- residuals(fit)
  sw <- shapiro.test(r)
  dw <- dwtest(fit)
  dw_exact <- n < 100
  dw_pan100 <- if (dw_exact) dwtest(fit, iterations = 100)$p.value else NULL
  bp <- bptest(fit)
  lof <- NULL
  if (anyDuplicated(x) > 0) {
    sat <- lm(y ~ factor(x))
    a <- anova(fit, sat)
    if (isTRUE(a$Df[2] > 0)) {
      lof <- list(
        F = a$F[2], df1 = a$Df[2], df2 = a$Res.Df[2], pValue = a[["Pr(>F)"]][2],
        pureErrorSS = a$RSS[2], lackOfFitSS = a[["Sum of Sq"]][2],
        replicatedLevels = sum(table(x) > 1)
      )
    }
  }
  h <- hatvalues(fit)
  cd <- cooks.distance(fit)
  list(
    n = n, p = p,
    design = arr(t(X)), # row-major
    residuals = arr(r), rss = deviance(fit),
    leverage = arr(h), cooksDistance = arr(cd),
    influentialLeverage = arr(which(h > 2 * p / n) - 1L),
    influentialCooks = arr(which(cd > 4 / n) - 1L),
    influentialCooks1 = arr(which(cd > 1) - 1L),
    shapiroWilk = list(statistic = unname(sw$statistic), pValue = sw$p.value),
    durbinWatson = list(statistic = unname(dw$statistic), pValue = dw$p.value,
                        method = if (dw_exact) "exact" else "normal", pValuePan100 = dw_pan100),
    breuschPagan = list(statistic = unname(bp$statistic), df = unname(bp$parameter), pValue = bp$p.value),
    lackOfFit = lof
  )
}

case_specs <- list(
  list(name = "cars", data = cars, x = "speed", y = "dist", k = 3),
  list(name = "women", data = women, x = "height", y = "weight", k = 3),
  list(name = "faithful", data = faithful, x = "eruptions", y = "waiting", k = 4),
  list(name = "mcycle", data = MASS::mcycle, x = "times", y = "accel", k = 8),
  list(name = "pressure", data = pressure, x = "temperature", y = "pressure", k = 4),
  list(name = "trees", data = trees, x = "Girth", y = "Volume", k = 3)
)
cases <- lapply(case_specs, function(s) {
  o <- order(s$data[[s$x]])
  x <- s$data[[s$x]][o]
  y <- s$data[[s$y]][o]
  k <- s$k
  line <- lm(y ~ x)
  spline <- lm(y ~ ns(x, df = k))
  list(
    name = s$name, source = paste0(s$name, ": ", s$y, " against ", s$x), x = arr(x), y = arr(y),
    fits = list(
      list(model = "y ~ x", record = fit_record(line, x, y)),
      list(model = sprintf("y ~ splines::ns(x, df = %d)", k), record = fit_record(spline, x, y))
    )
  )
})

# ---------------------------------------------------------------- Shapiro-Wilk on raw samples
sw_samples <- list(
  list(name = "trees$Height[1:3]", x = trees$Height[1:3]),
  list(name = "trees$Height[1:7]", x = trees$Height[1:7]),
  list(name = "women$weight", x = women$weight),
  list(name = "precip", x = unname(precip)),
  list(name = "rivers", x = rivers),
  list(name = "faithful$eruptions", x = faithful$eruptions),
  list(name = "quakes$mag", x = quakes$mag)
)
shapiro <- lapply(sw_samples, function(s) {
  t <- shapiro.test(s$x)
  list(name = s$name, x = arr(s$x), statistic = unname(t$statistic), pValue = t$p.value)
})

# ---------------------------------------------------------------- quantiles, QQ positions, density
probs <- c(0, 0.01, 0.1, 0.25, 1 / 3, 0.5, 0.9, 0.99, 1)
quant <- lapply(list(
  list(name = "faithful$eruptions", x = faithful$eruptions),
  list(name = "cars$dist", x = cars$dist),
  list(name = "precip", x = unname(precip))
), function(s) list(name = s$name, sorted = arr(sort(s$x)), probs = arr(probs), type7 = arr(quantile(s$x, probs, type = 7, names = FALSE))))

qq <- lapply(c(3, 8, 10, 11, 50), function(n) list(n = n, theoretical = arr(qnorm(ppoints(n)))))

nx <- 9
ny <- 7
xb <- seq(min(faithful$eruptions), max(faithful$eruptions), length.out = nx + 1)
yb <- seq(min(faithful$waiting), max(faithful$waiting), length.out = ny + 1)
on_break <- sum(faithful$eruptions %in% xb[2:nx]) + sum(faithful$waiting %in% yb[2:ny])
if (on_break > 0) stop("density reference: a data value lies on an interior break; choose other grid sizes")
tab <- table(
  cut(faithful$waiting, yb, right = FALSE, include.lowest = TRUE),
  cut(faithful$eruptions, xb, right = FALSE, include.lowest = TRUE)
)
density <- list(
  name = "faithful: waiting against eruptions", nx = nx, ny = ny,
  counts = arr(as.integer(t(unclass(tab)))) # row-major, rows = y bins from the lowest
)

fixture <- list(
  generator = "test/reference/r/diagnostics.R",
  r = R.version.string,
  packages = list(
    lmtest = as.character(packageVersion("lmtest")),
    MASS = as.character(packageVersion("MASS")),
    splines = as.character(packageVersion("splines")),
    stats = as.character(packageVersion("stats"))
  ),
  distributions = dist,
  cases = cases,
  shapiroWilk = shapiro,
  quantiles = quant,
  ppoints = qq,
  density = density
)
how <- write_json_file(fixture, out_file)
cat("wrote", out_file, "with", how, "\n")
