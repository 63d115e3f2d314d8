# Reference values for Forkscape's analytic weights together with two crossed absorbed fixed-effect columns,
# computed with R's lm(weights = w) with explicit factor() dummies for every fixed-effect column, and
# sandwich::vcovHC / vcovCL on that weighted fit (Zeileis 2004, "Econometric computing with HC and HAC
# covariance matrix estimators", Journal of Statistical Software 11(10); Zeileis, Koell & Graham 2020,
# "Various versatile variances", Journal of Statistical Software 95(1)).
#
# Run from the repository root, after two-way-effects-reference.R (whose panel it reads and does not change),
# with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/two-way-weights-reference.R
#
# It writes, under src/test/resources/reference/:
#   school-panel-weighted.csv          the rows of school-panel.csv with a `weight` column drawn here with a
#                                      fixed seed (below): zeros scattered over the panel, a pupil whose
#                                      weights are all zero (so the pupil is not among the levels present),
#                                      a pupil left with one positive-weight row (a singleton of the weighted
#                                      fit), zeros that cut school B's terms apart (four connected
#                                      components of the weighted pupil-term graph, two unweighted), and
#                                      missing weights
#   school-panel-weighted-expected.csv per specification of school-panel-weighted-plan.json (written by
#                                      hand): the key estimate, its standard error, df, rows, coefficients
#                                      (lm's rank), R-squared, adjusted R-squared and the model F test
#                                      (summary.lm's, weighted), the standardized coefficient, the rank of
#                                      the fixed-effect dummies alone, and the status
#   school-panel-weighted-coefficients.csv  every coefficient (estimate and standard error) of the weighted
#                                      specifications with both effects absorbed, for the full fit
#   two-way-weights-versions.txt       the R and sandwich versions that produced them
#
# Zero weights. As in weights-reference.R, each specification is fitted on its positive-weight rows: that is
# Forkscape's documented contract (N = rows with positive weight; README, "Plan file", weights), and what lm
# itself does for the coefficients, the residual variance, df.residual and R-squared.
#
# The plan is not parsed: its multiverse is written out below with loops, in the plan's decision order with
# the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: the committed panel, with weights -----------------------------------------------------------------

panel <- read.csv(file.path(out, "school-panel.csv"), na.strings = "", check.names = FALSE,
                  stringsAsFactors = FALSE)
set.seed(20261205)
n <- nrow(panel)
panel$weight <- round(runif(n, 0.2, 2.5), 3)
panel$weight[runif(n) < 0.08] <- 0
# a pupil whose weights are all zero: absent from the weighted fit's levels
panel$weight[panel$pupil == "A07"] <- 0
# a pupil left with one positive-weight row: a singleton level of the weighted fit only
a12 <- which(panel$pupil == "A12")
panel$weight[a12[-1]] <- 0
panel$weight[a12[1]] <- 1.5
# school B's terms cut apart by zero weights: each pupil of B keeps positive weights in terms 7-8 or in terms
# 9-10, never both, and (with this seed) no pupil left in term 9 is left in term 10, so the weighted pupil-term
# graph has four connected components where the unweighted one has two: rank 49 + 10 - 4 = 55
b_pupil <- startsWith(panel$pupil, "B")
b_late <- panel$term %in% c("T09", "T10")
b_odd <- as.integer(substring(panel$pupil, 2)) %% 2 == 1
panel$weight[b_pupil & ((b_odd & b_late) | (!b_odd & !b_late))] <- 0
# missing weights: those rows leave the weighted specifications only
panel$weight[sample(setdiff(seq_len(n), c(a12, which(panel$pupil == "A07"))), 3)] <- NA
path <- file.path(out, "school-panel-weighted.csv")
write.csv(panel, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

# --- one specification ------------------------------------------------------------------------------------

cluster_of <- function(e) if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+",
                                                              fixed = TRUE)[[1]] else character(0)

# The rows of one specification: complete on every variable it uses (its weight and cluster columns too),
# then, when weighted, the positive-weight rows alone.
rows_of <- function(d, controls, absorb, e, weight) {
  m <- na.omit(d[, unique(c(".y", ".x", controls, absorb, cluster_of(e), weight)), drop = FALSE])
  if (length(weight) > 0) m <- m[m[[weight]] > 0, , drop = FALSE]
  m
}

# lm's QR keeps the earlier of two collinear columns: with the controls first (effects_first = FALSE) a
# control constant within an absorbed column stays and one of that column's dummies goes, which moves no
# other coefficient than the aliased pair; with the dummies first the control goes (NA), as Forkscape drops
# it beside the effects, and the remaining coefficients are those the full fit reports.
formula_of <- function(controls, absorb, effects_first = FALSE) {
  effects <- if (length(absorb) > 0) sprintf("factor(`%s`)", absorb)
  terms <- if (effects_first) c(effects, sprintf("`%s`", controls), ".x")
           else c(sprintf("`%s`", controls), effects, ".x")
  reformulate(terms, response = ".y")
}

fit_of <- function(m, controls, absorb, weight, effects_first = FALSE) {
  formula <- formula_of(controls, absorb, effects_first)
  if (length(weight) > 0) {
    m$.w <- m[[weight]]
    lm(formula, data = m, weights = .w)
  } else lm(formula, data = m)
}

# The covariance of the specification's type, from vcov() of lm, vcovHC or vcovCL.
covariance <- function(fit, e, m) {
  if (e == "classical") return(vcov(fit))
  if (e %in% c("HC0", "HC1")) return(vcovHC(fit, type = e))
  # character cluster columns, so that G counts the clusters present in these rows
  cl <- as.data.frame(lapply(m[, cluster_of(e), drop = FALSE], as.character), stringsAsFactors = FALSE)
  vcovCL(fit, cluster = cl, type = "HC1", cadjust = TRUE, multi0 = FALSE)
}

fit_one <- function(d, controls, absorb, e, weight) {
  m <- rows_of(d, controls, absorb, e, weight)
  base <- if (length(absorb) > 0) {
    f <- as.data.frame(lapply(m[, absorb, drop = FALSE], factor))
    qr(model.matrix(reformulate(sprintf("`%s`", absorb)), data = f))$rank
  } else 1
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, r2 = NA,
              adj_r2 = NA, model_f = NA, model_p_value = NA, std_estimate = NA, effects_rank = base,
              status = "ok")
  if (nrow(m) <= base) {
    row$status <- "too few rows"
    return(row)
  }
  fit <- fit_of(m, controls, absorb, weight)
  row$n_params <- fit$rank
  row$estimate <- unname(coef(fit)[".x"])
  if (is.na(row$estimate)) {
    row$status <- "collinear"
    row$n_params <- NA
    return(row)
  }
  if (fit$df.residual <= 0) {
    row$status <- "too few rows"
    return(row)
  }
  fs <- summary(fit)
  row$r2 <- fs$r.squared
  row$adj_r2 <- fs$adj.r.squared
  row$model_f <- unname(fs$fstatistic["value"])
  row$model_p_value <- pf(fs$fstatistic["value"], fs$fstatistic["numdf"], fs$fstatistic["dendf"],
                          lower.tail = FALSE)[[1]]
  # the coefficient in standard deviations of the outcome per standard deviation of the key predictor, both
  # over the specification's rows about their (weighted) mean, with the same weights (README, std_estimate)
  w <- if (length(weight) > 0) m[[weight]] else rep(1, nrow(m))
  spread <- function(x) sum(w * (x - sum(w * x) / sum(w))^2)
  row$std_estimate <- row$estimate * sqrt(spread(m$.x) / spread(m$.y))
  cl <- cluster_of(e)
  groups <- sapply(cl, function(c) length(unique(m[[c]])))
  row$df <- if (length(cl) > 0) min(groups) - 1 else fit$df.residual
  if (length(cl) > 0 && min(groups) < 2) {
    row$status <- "one cluster"
    return(row)
  }
  v <- covariance(fit, e, m)[".x", ".x"]
  if (!(v > 0)) {
    row$status <- "undefined: the multi-way cluster variance"
    return(row)
  }
  row$std_error <- sqrt(v)
  row
}

# Every coefficient but the dummies', named as Forkscape's full fit names them (the key by its column).
coefficients_of <- function(d, controls, absorb, e, weight) {
  m <- rows_of(d, controls, absorb, e, weight)
  fit <- fit_of(m, controls, absorb, weight, effects_first = TRUE)
  v <- covariance(fit, e, m)
  terms <- c(controls, ".x")
  b <- coef(fit)[terms]
  # a control the effects make redundant is NA in lm's coefficients and absent from the full fit
  kept <- terms[!is.na(b)]
  se <- sqrt(diag(v)[kept])
  data.frame(term = ifelse(kept == ".x", "tutoring_hours", kept), estimate = num(unname(b[kept])),
             std_error = num(unname(se)), stringsAsFactors = FALSE)
}

# --- plan school-panel-weighted-plan.json -------------------------------------------------------------------

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

optional <- c("attendance", "class_size", "home_support")
absorbs <- list(list(label = "none", columns = character(0)), list(label = "pupil", columns = "pupil"),
                list(label = "term", columns = "term"), list(label = "pupil and term", columns = c("pupil", "term")))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "survey", column = "weight"))
errors <- c("classical", "HC0", "HC1", "cluster:pupil", "cluster:pupil+term")
d <- d_all
d$.y <- d$score
d$.x <- d$tutoring_hours
rows <- list()
coefficients <- list()
spec <- 0
for (mask in 0:7) for (a in absorbs) for (w in weights) for (e in errors) {
  controls <- subset_of(optional, mask)
  r <- fit_one(d, controls, a$columns, e, w$column)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = "score", tutoring = "hours", controls = subset_label(controls),
                         effects = a$label, weights = w$label), r)
  if (length(a$columns) == 2 && length(w$column) > 0 && r$status == "ok") {
    coefficients[[length(coefficients) + 1]] <- cbind(spec = spec, errors = e,
                                                      coefficients_of(d, controls, a$columns, e, w$column))
  }
}
columns <- c("spec", "outcome", "tutoring", "controls", "effects", "weights", "errors", "estimate", "std_error",
             "df", "n_obs", "n_params", "r2", "adj_r2", "model_f", "model_p_value", "std_estimate",
             "effects_rank", "status")
table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
  x <- r[[c]]
  if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
}, "")), check.names = FALSE)
write.csv(table, file.path(out, "school-panel-weighted-expected.csv"), row.names = FALSE, quote = TRUE)
write.csv(do.call(rbind, coefficients), file.path(out, "school-panel-weighted-coefficients.csv"),
          row.names = FALSE, quote = TRUE)

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/two-way-weights-reference.R"), file.path(out, "two-way-weights-versions.txt"))
