# Reference values for the common-curve test of grouped data (core/groups/common.ts).
#
# Run from the repository root:   Rscript test/reference/r/groups.R
# Writes:                         test/reference/fixtures/groups.json
# Needs:                          R >= 4.2 (stats, splines, datasets; all part of base R)
#
# Numbers are written with the shortest of 15, 16 or 17 significant digits that reads back to
# the identical double (the writer in json.R).
#
# Definitions (docs/design.md, "df"): df counts the intercept, so Knotwise's natural spline
# with df = k is lm(y ~ splines::ns(x, df = k - 1)). The knots are placed once, on the x of
# all rows pooled, and then held fixed:
#   B  = ns(x, knots = <interior knots of ns(x, df = k - 1)>, Boundary.knots = range(x))
#   common model     m0 = lm(y ~ B)                        k coefficients
#   separate model   m1 = lm(y ~ g * B)                    G k coefficients (g a factor)
#   group h alone    mh = lm(y ~ B * (g == h))             2 k coefficients: group h has its
#                                                          own curve, the others share one
# and the extra-sum-of-squares F tests are anova(m0, m1) and anova(m0, mh). With prior
# weights w every lm gets weights = w, so the sums of squares are weighted.

suppressPackageStartupMessages(library(splines))

out_path <- file.path("test", "reference", "fixtures", "groups.json")
if (!dir.exists(dirname(out_path))) stop("run this script from the repository root (", dirname(out_path), " not found)")

source(file.path("test", "reference", "r", "json.R"))

# ---- open datasets shipped with R --------------------------------------------------------
datasets <- list(
  orange = list(
    source = "datasets::Orange (Draper & Smith 1998), circumference ~ age by Tree; 5 trees, the same 7 ages each",
    x = as.numeric(Orange$age), y = as.numeric(Orange$circumference), g = as.character(Orange$Tree), w = NULL
  ),
  co2 = list(
    source = "datasets::CO2 (Potvin, Lechowicz & Tardif 1990), uptake ~ conc by Plant; 12 plants, the same 7 concentrations each",
    x = as.numeric(CO2$conc), y = as.numeric(CO2$uptake), g = as.character(CO2$Plant), w = NULL
  ),
  theoph = list(
    source = "datasets::Theoph (Boeckmann, Sheiner & Beal 1994), conc ~ Time by Subject; 12 subjects, each sampled at its own times",
    x = as.numeric(Theoph$Time), y = as.numeric(Theoph$conc), g = as.character(Theoph$Subject), w = NULL
  ),
  # Weighted case: deterministic prior weights w = 100 / conc (variance taken proportional
  # to the concentration), so that the weighted sums of squares are checked too.
  # A deliberate shift of an open dataset: three of the Orange trees, tree 3 moved up by 60 mm,
  # so one group is far from the two others (the step-down naming must name it alone).
  orange3_shift = list(
    source = "datasets::Orange, trees 1, 3 and 5, circumference of tree 3 + 60 (a deliberate shift)",
    x = as.numeric(Orange$age[Orange$Tree %in% c("1", "3", "5")]),
    y = as.numeric(Orange$circumference[Orange$Tree %in% c("1", "3", "5")]) + ifelse(Orange$Tree[Orange$Tree %in% c("1", "3", "5")] == "3", 60, 0),
    g = as.character(Orange$Tree[Orange$Tree %in% c("1", "3", "5")]), w = NULL
  ),
  co2_w = list(
    source = "datasets::CO2, uptake ~ conc by Plant, prior weights w = 100 / conc (deterministic)",
    x = as.numeric(CO2$conc), y = as.numeric(CO2$uptake), g = as.character(CO2$Plant), w = 100 / as.numeric(CO2$conc)
  )
)

cases_wanted <- list(
  list(dataset = "orange", df = 3:5),
  list(dataset = "co2", df = 3:5),
  list(dataset = "theoph", df = 4:6),
  list(dataset = "co2_w", df = 4),
  list(dataset = "orange3_shift", df = 3:4)
)

# The step-down naming of the groups that differ (core/groups/common.ts stepDown): with the
# groups in S given their own curves and the rest sharing one (m_S = lm(y ~ gS * B), gS the
# group for S and ".rest" otherwise; m_{} = lm(y ~ B)), the group h of the rest with the
# largest deviance(m_S) - deviance(m_{S+h}) is named when its F on k and the separate model's
# residual df (denominator: the separate model's residual mean square) has a Holm-adjusted
# p-value (m remaining groups: min(1, m p), never below the previous step's) below 0.05;
# a group is named only while at least 3 remain, at most 20 steps.
step_down <- function(frame, g, k, w, m1, level = 0.05, max_steps = 20) {
  ms <- deviance(m1) / df.residual(m1)
  fit_S <- function(S) {
    if (length(S) == 0) return(fit_lm(y ~ B, frame, w))
    frame$gS <- factor(ifelse(as.character(g) %in% S, as.character(g), ".rest"))
    fit_lm(y ~ gS * B, frame, w)
  }
  S <- character(0)
  prev <- 0
  steps <- list()
  repeat {
    R <- setdiff(levels(g), S)
    if (length(R) < 3 || length(steps) >= max_steps) break
    dS <- deviance(fit_S(S))
    extra <- sapply(R, function(h) dS - deviance(fit_S(c(S, h))))
    h <- R[which.max(extra)]
    F <- max(extra) / k / ms
    p <- pf(F, k, df.residual(m1), lower.tail = FALSE)
    p_adj <- max(prev, min(1, length(R) * p))
    if (!(p_adj < level)) break
    steps[[length(steps) + 1]] <- list(name = h, F = F, p = p, pAdjusted = p_adj)
    prev <- p_adj
    S <- c(S, h)
  }
  steps
}

fit_lm <- function(formula, frame, w) {
  if (is.null(w)) lm(formula, data = frame) else { frame$w <- w; lm(formula, data = frame, weights = w) }
}

# Residual sum of squares, residual df, F and p of anova(small, big).
compare <- function(small, big, coefficients) {
  stopifnot(big$rank == coefficients)
  a <- anova(small, big)
  list(
    rssSmall = a[["RSS"]][1], rssBig = a[["RSS"]][2],
    dfNum = a[["Df"]][2], dfDen = a[["Res.Df"]][2],
    F = a[["F"]][2], p = a[["Pr(>F)"]][2]
  )
}

make_case <- function(name, d, k) {
  x <- d$x
  y <- d$y
  g <- factor(d$g, levels = unique(d$g))
  G <- nlevels(g)
  # The pooled knots: those of ns(x, df = k - 1) on all rows (test/reference/r/fits.R).
  pooled <- ns(x, df = k - 1)
  knots <- as.numeric(attr(pooled, "knots"))
  boundary <- as.numeric(attr(pooled, "Boundary.knots"))
  B <- ns(x, knots = knots, Boundary.knots = boundary)
  stopifnot(isTRUE(all.equal(unclass(B)[, ], unclass(pooled)[, ], check.attributes = FALSE)))
  frame <- data.frame(y = y, g = g)
  frame$B <- B
  m0 <- fit_lm(y ~ B, frame, d$w)
  stopifnot(m0$rank == k)
  m1 <- fit_lm(y ~ g * B, frame, d$w)
  overall <- compare(m0, m1, G * k)
  named <- if (overall$p < 0.05) step_down(frame, g, k, d$w, m1) else list()
  per_group <- lapply(levels(g), function(h) {
    frame$own <- as.numeric(g == h)
    mh <- fit_lm(y ~ B * own, frame, d$w)
    r <- compare(m0, mh, 2 * k)
    list(name = h, rss = r$rssBig, dfNum = r$dfNum, dfDen = r$dfDen, F = r$F, p = r$p)
  })
  list(
    name = sprintf("%s df=%d", name, k),
    dataset = name,
    df = k,
    rCall = sprintf(
      "anova(lm(y ~ B%s), lm(y ~ g * B%s)), B = ns(x, knots = attr(ns(x, df = %d), \"knots\"), Boundary.knots = range(x))",
      if (is.null(d$w)) "" else ", weights = w", if (is.null(d$w)) "" else ", weights = w", k - 1
    ),
    n = length(x),
    groups = G,
    interiorKnots = I(knots),
    boundaryKnots = I(boundary),
    rssCommon = overall$rssSmall,
    rssSeparate = overall$rssBig,
    dfNum = overall$dfNum,
    dfDen = overall$dfDen,
    F = overall$F,
    p = overall$p,
    perGroup = per_group,
    stepDown = named
  )
}

cases <- list()
for (want in cases_wanted) {
  d <- datasets[[want$dataset]]
  for (k in want$df) cases[[length(cases) + 1]] <- make_case(want$dataset, d, k)
}

data_out <- lapply(datasets, function(d) list(
  source = d$source, x = I(d$x), y = I(d$y), g = I(d$g), w = if (is.null(d$w)) NULL else I(d$w)
))

doc <- list(
  generatedBy = "test/reference/r/groups.R",
  rVersion = R.version.string,
  datasets = data_out,
  cases = cases
)

writeLines(to_json(doc), out_path)
cat(sprintf("wrote %s: %d cases\n", out_path, length(cases)))
