# Reference values for Forkscape's absorption of three and four crossed fixed-effect columns, computed with R's
# lm (and lm(weights = )) with explicit factor() dummies for every fixed-effect column, its hatvalues(), and
# sandwich::vcovHC (HC0 to HC3) / vcovCL (Zeileis 2004, "Econometric computing with HC and HAC covariance matrix estimators", Journal of
# Statistical Software 11(10); Zeileis, Koell & Graham 2020, "Various versatile variances", Journal of
# Statistical Software 95(1)).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/three-way-effects-reference.R
#
# It writes, under src/test/resources/reference/:
#   three-way-panel.csv            an invented, unbalanced panel of pupils over terms with their teachers and home
#                                  regions, generated here with a fixed seed (below). The dummies' rank is not the
#                                  naive count (levels less one per column): two schools whose pupils, terms and
#                                  teachers never meet (two groups); in school A one teacher keeps the same class
#                                  every term (that teacher's dummy is the sum of the class's pupils' dummies); in
#                                  school B each teacher takes every class of two whole terms (each teacher's dummy
#                                  is the sum of two term dummies); the region is a function of the pupil (nested
#                                  in it); pupils seen once (singletons) and a flag for the others; a control constant within pupils, one
#                                  constant within terms, one with missing cells; positive survey weights
#   three-way-panel-expected.csv   per specification of three-way-panel-plan.json (written by hand): the key
#                                  estimate, its standard error, df, rows, coefficients (lm's fit$rank), R-squared,
#                                  the rank of the fixed-effect dummies alone (qr() of their model matrix), the
#                                  largest leverage (hatvalues, HC2 and HC3 only) and the status
#   three-way-versions.txt         the R and sandwich versions that produced both
#
# The plan is not parsed: its multiverse is written out below with loops, in the plan's decision order with
# the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: school A, 36 pupils in 3 classes over terms 1-6; school B, 24 pupils in 2 classes over terms 7-10 --

set.seed(20261204)
a <- expand.grid(term = 1:6, pupil = sprintf("A%02d", 1:36), stringsAsFactors = FALSE)
b <- expand.grid(term = 7:10, pupil = sprintf("B%02d", 1:24), stringsAsFactors = FALSE)
a$school <- "A"
b$school <- "B"
a$class <- sprintf("A%d", 1 + as.integer(sub("A", "", a$pupil)) %% 3)
b$class <- sprintf("B%d", 1 + as.integer(sub("B", "", b$pupil)) %% 2)
# school A: class A1 always has teacher a1; classes A2 and A3 swap teachers a2 and a3 after term 3, and in
# term 6 a4 takes A3. School B: teacher b1 takes both classes in terms 7 and 8, b2 in terms 9 and 10.
a$teacher <- ifelse(a$class == "A1", "a1",
             ifelse(a$term == 6 & a$class == "A3", "a4",
             ifelse((a$class == "A2") == (a$term <= 3), "a2", "a3")))
b$teacher <- ifelse(b$term <= 8, "b1", "b2")
panel <- rbind(a, b)
panel <- panel[runif(nrow(panel)) > 0.2, ]
# two pupils who joined for one term only: singleton levels of the pupil effects
panel <- rbind(panel, data.frame(term = c(2, 9), pupil = c("A37", "B25"), school = c("A", "B"),
                                 class = c("A2", "B1"), teacher = c("a2", "b2")))
pupils <- sort(unique(panel$pupil))
n <- nrow(panel)
# each pupil's home region: nested in the pupil (three regions in A, two in B)
region_of <- setNames(ifelse(startsWith(pupils, "A"), sprintf("r%d", 1 + seq_along(pupils) %% 3),
                             sprintf("r%d", 4 + seq_along(pupils) %% 2)), pupils)
panel$region <- unname(region_of[panel$pupil])
pupil_effect <- rnorm(length(pupils))[match(panel$pupil, pupils)]
term_effect <- rnorm(10, sd = 0.7)[panel$term]
teacher_effect <- c(a1 = 0.4, a2 = -0.3, a3 = 0.2, a4 = 0.9, b1 = -0.5, b2 = 0.1)[panel$teacher]
panel$term <- sprintf("T%02d", panel$term)
panel$home_support <- round(rnorm(length(pupils)), 2)[match(panel$pupil, pupils)] + round(0.5 * pupil_effect, 2)
panel$class_size <- round(25 + 3 * rnorm(10), 0)[as.integer(sub("T", "", panel$term))]
panel$attendance <- round(0.9 + 0.05 * rnorm(n), 3)
panel$tutoring_hours <- round(pmax(0, 2 + 0.8 * pupil_effect + 0.5 * term_effect + 0.6 * teacher_effect + rnorm(n)), 2)
panel$score <- round(50 + 1.5 * panel$tutoring_hours + 3 * pupil_effect + 2 * term_effect + 2 * teacher_effect
                     + 10 * panel$attendance - 0.2 * panel$class_size + 0.8 * panel$home_support
                     + rnorm(n, sd = 1 + 0.3 * abs(pupil_effect)), 3)
panel$weight <- round(runif(n, 0.5, 2), 3)
panel$attendance[runif(n) < 0.08] <- NA
# pupils seen in two or more terms: without the singletons, HC2 and HC3 beside pupil effects are defined
panel$steady <- as.integer(table(panel$pupil)[panel$pupil] >= 2)
panel <- panel[, c("pupil", "term", "teacher", "region", "school", "class", "home_support", "class_size",
                   "attendance", "tutoring_hours", "score", "weight", "steady")]
path <- file.path(out, "three-way-panel.csv")
write.csv(panel, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

# --- one specification ------------------------------------------------------------------------------------

cluster_of <- function(e) if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+",
                                                                  fixed = TRUE)[[1]] else character(0)

# Fits .y on the controls, the dummies of every absorbed column and .x (last, so that lm aliases a dummy or a
# control rather than the key predictor), on the rows complete on every variable the specification uses (its
# cluster columns and weight too), as Forkscape's statuses order the checks.
fit_one <- function(d, controls, absorb, e, weight) {
  used <- unique(c(".y", ".x", controls, absorb, cluster_of(e), weight))
  m <- na.omit(d[, used, drop = FALSE])
  for (f in absorb) m[[f]] <- factor(m[[f]])
  base <- if (length(absorb) > 0) qr(model.matrix(reformulate(sprintf("`%s`", absorb)), data = m))$rank else 1
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, r2 = NA,
              effects_rank = base, max_leverage = NA, status = "ok")
  if (nrow(m) <= base) {
    row$status <- "too few rows"
    return(row)
  }
  terms <- c(sprintf("`%s`", controls), if (length(absorb) > 0) sprintf("`%s`", absorb), ".x")
  formula <- reformulate(terms, response = ".y")
  fit <- if (length(weight) > 0) {
    m$.w <- m[[weight]]
    lm(formula, data = m, weights = .w)
  } else lm(formula, data = m)
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
  row$r2 <- summary(fit)$r.squared
  if (e == "classical") {
    row$std_error <- sqrt(vcov(fit)[".x", ".x"])
    row$df <- fit$df.residual
    return(row)
  }
  if (e %in% c("HC0", "HC1")) {
    row$std_error <- sqrt(vcovHC(fit, type = e)[".x", ".x"])
    row$df <- fit$df.residual
    return(row)
  }
  if (e %in% c("HC2", "HC3")) {
    # a row whose leverage is 1 (a singleton pupil, say) leaves HC2 and HC3 undefined: Forkscape's rule is a
    # leverage above 1 - 1e-10 (README, statuses), which these rows meet to roundoff
    row$max_leverage <- max(hatvalues(fit))
    if (row$max_leverage > 1 - 1e-10) {
      row$status <- "undefined: leverage 1"
      return(row)
    }
    row$std_error <- sqrt(vcovHC(fit, type = e)[".x", ".x"])
    row$df <- fit$df.residual
    return(row)
  }
  cluster <- cluster_of(e)
  groups <- sapply(cluster, function(cl) length(unique(m[[cl]])))
  if (min(groups) < 2) {
    row$status <- "one cluster"
    return(row)
  }
  # character cluster columns, so that G counts the clusters present in these rows
  cl <- as.data.frame(lapply(m[, cluster, drop = FALSE], as.character), stringsAsFactors = FALSE)
  v <- vcovCL(fit, cluster = cl, type = "HC1", cadjust = TRUE, multi0 = FALSE)[".x", ".x"]
  row$df <- min(groups) - 1
  if (!(v > 0)) {
    row$status <- "undefined: the multi-way cluster variance"
    return(row)
  }
  row$std_error <- sqrt(v)
  row
}

# --- plan three-way-panel-plan.json -------------------------------------------------------------------------

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

optional <- c("attendance", "class_size", "home_support")
samples <- list(list(label = "both schools", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "school A", keep = function(d) d$school == "A"),
                list(label = "steady pupils", keep = function(d) d$steady == 1))
absorbs <- list(list(label = "none", columns = character(0)),
                list(label = "pupil and term", columns = c("pupil", "term")),
                list(label = "pupil, term and teacher", columns = c("pupil", "term", "teacher")),
                list(label = "term, teacher and region", columns = c("term", "teacher", "region")),
                list(label = "all four", columns = c("pupil", "term", "teacher", "region")))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "survey", column = "weight"))
errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:pupil", "cluster:pupil+term")
rows <- list()
spec <- 0
for (mask in 0:7) for (s in samples) for (a in absorbs) for (w in weights) for (e in errors) {
  d <- d_all[s$keep(d_all), ]
  d$.y <- d$score
  d$.x <- d$tutoring_hours
  controls <- subset_of(optional, mask)
  r <- fit_one(d, controls, a$columns, e, w$column)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = "score", tutoring = "hours", controls = subset_label(controls),
                         rows = s$label, effects = a$label, weights = w$label), r)
}
columns <- c("spec", "outcome", "tutoring", "controls", "rows", "effects", "weights", "errors", "estimate",
             "std_error", "df", "n_obs", "n_params", "r2", "effects_rank", "max_leverage", "status")
table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
  x <- r[[c]]
  if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
}, "")), check.names = FALSE)
write.csv(table, file.path(out, "three-way-panel-expected.csv"), row.names = FALSE, quote = TRUE)

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/three-way-effects-reference.R"), file.path(out, "three-way-versions.txt"))
