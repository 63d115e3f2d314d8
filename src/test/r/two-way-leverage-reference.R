# Reference values for Forkscape's HC2 and HC3 standard errors beside two crossed absorbed fixed-effect
# columns, unweighted and with analytic weights, computed with R's lm (weights = w or none) with explicit
# factor() dummies for every fixed-effect column, hatvalues() of that fit, and sandwich::vcovHC(type = "HC2" /
# "HC3") (MacKinnon & White 1985, "Some heteroskedasticity-consistent covariance matrix estimators with improved
# finite sample properties", Journal of Econometrics 29(3); Zeileis 2004, "Econometric computing with HC and HAC
# covariance matrix estimators", Journal of Statistical Software 11(10)).
#
# Run from the repository root, after two-way-effects-reference.R and two-way-weights-reference.R (whose panel
# it reads and does not change), with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/two-way-leverage-reference.R
#
# It writes, under src/test/resources/reference/:
#   school-panel-leverage.csv          the rows of school-panel-weighted.csv (the invented panel of pupils over
#                                      terms in two schools whose pupils and terms never meet, singleton pupils,
#                                      survey weights with zeros and missing cells) with a `design_weight`
#                                      column drawn here with a fixed seed (below), positive in every row, so
#                                      that its weighted pupil-term graph is the unweighted one, and a `steady`
#                                      column (below) for the row rule that leaves the singletons out
#   school-panel-leverage-expected.csv per specification of school-panel-leverage-plan.json (written by hand):
#                                      the key estimate, its HC2 or HC3 standard error, df, rows, coefficients
#                                      (lm's rank), R-squared, the largest leverage (hatvalues) and the status
#   school-panel-leverage-coefficients.csv  every coefficient (estimate and standard error) of the
#                                      specifications with both effects absorbed whose status is ok, for the
#                                      full fit
#   two-way-leverage-versions.txt      the R and sandwich versions that produced them
#
# A row whose leverage is 1 (a singleton pupil, or any row whose removal would split its part of the pupil-term
# graph) has a residual of 0 and makes HC2 and HC3 0/0, for which sandwich gives NaN; such a specification has
# the status "undefined: leverage 1", Forkscape's rule (leverage above 1 - 1e-10). Zero weights: as in
# weights-reference.R, each weighted specification is fitted on its positive-weight rows.
#
# The plan is not parsed: its multiverse is written out below with loops, in the plan's decision order with
# the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: the committed weighted panel, with positive design weights ----------------------------------------

panel <- read.csv(file.path(out, "school-panel-weighted.csv"), na.strings = "", check.names = FALSE,
                  stringsAsFactors = FALSE)
set.seed(20261207)
panel$design_weight <- round(runif(nrow(panel), 0.5, 3), 3)
# 1 for a pupil with at least two rows that every specification keeps (attendance recorded, survey weight
# positive), 0 otherwise: the row rule "pupils seen twice or more" keeps no singleton in any specification
steady_rows <- !is.na(panel$attendance) & !is.na(panel$weight) & panel$weight > 0
seen <- table(panel$pupil[steady_rows])
panel$steady <- as.integer(panel$pupil %in% names(seen)[seen >= 2])
path <- file.path(out, "school-panel-leverage.csv")
write.csv(panel, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

# --- one specification ------------------------------------------------------------------------------------

# The rows of one specification: complete on every variable it uses (its weight too), then, when weighted,
# the positive-weight rows alone.
rows_of <- function(d, controls, absorb, weight) {
  m <- na.omit(d[, unique(c(".y", ".x", controls, absorb, weight)), drop = FALSE])
  if (length(weight) > 0) m <- m[m[[weight]] > 0, , drop = FALSE]
  m
}

# lm's QR keeps the earlier of two collinear columns: with the controls first a control constant within an
# absorbed column stays and one of that column's dummies goes, which moves no other coefficient than the
# aliased pair; with the dummies first the control goes (NA), as Forkscape drops it beside the effects.
fit_of <- function(m, controls, absorb, weight, effects_first = FALSE) {
  effects <- sprintf("factor(`%s`)", absorb)
  terms <- if (effects_first) c(effects, sprintf("`%s`", controls), ".x")
           else c(sprintf("`%s`", controls), effects, ".x")
  formula <- reformulate(terms, response = ".y")
  if (length(weight) > 0) {
    m$.w <- m[[weight]]
    lm(formula, data = m, weights = .w)
  } else lm(formula, data = m)
}

fit_one <- function(d, controls, absorb, e, weight) {
  m <- rows_of(d, controls, absorb, weight)
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, r2 = NA,
              max_leverage = NA, status = "ok")
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
  row$r2 <- summary(fit)$r.squared
  row$df <- fit$df.residual
  row$max_leverage <- max(hatvalues(fit))
  if (row$max_leverage > 1 - 1e-10) {
    row$status <- "undefined: leverage 1"
    return(row)
  }
  row$std_error <- sqrt(vcovHC(fit, type = e)[".x", ".x"])
  row
}

# Every coefficient but the dummies', named as Forkscape's full fit names them (the key by its column).
coefficients_of <- function(d, controls, absorb, e, weight) {
  m <- rows_of(d, controls, absorb, weight)
  fit <- fit_of(m, controls, absorb, weight, effects_first = TRUE)
  v <- vcovHC(fit, type = e)
  terms <- c(controls, ".x")
  b <- coef(fit)[terms]
  kept <- terms[!is.na(b)]
  se <- sqrt(diag(v)[kept])
  data.frame(term = ifelse(kept == ".x", "tutoring_hours", kept), estimate = num(unname(b[kept])),
             std_error = num(unname(se)), stringsAsFactors = FALSE)
}

# --- plan school-panel-leverage-plan.json ---------------------------------------------------------------------

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

optional <- c("attendance", "class_size", "home_support")
samples <- list(list(label = "every pupil", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "pupils seen twice or more", keep = function(d) d$steady == 1))
absorbs <- list(list(label = "pupil", columns = "pupil"), list(label = "pupil and term", columns = c("pupil", "term")))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "design", column = "design_weight"),
                list(label = "survey", column = "weight"))
errors <- c("HC2", "HC3")
d <- d_all
d$.y <- d$score
d$.x <- d$tutoring_hours
rows <- list()
coefficients <- list()
spec <- 0
for (mask in 0:7) for (s in samples) for (a in absorbs) for (w in weights) for (e in errors) {
  controls <- subset_of(optional, mask)
  ds <- d[s$keep(d), ]
  r <- fit_one(ds, controls, a$columns, e, w$column)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = "score", tutoring = "hours", controls = subset_label(controls),
                         rows = s$label, effects = a$label, weights = w$label), r)
  if (length(a$columns) == 2 && r$status == "ok") {
    coefficients[[length(coefficients) + 1]] <- cbind(spec = spec, errors = e,
                                                      coefficients_of(ds, controls, a$columns, e, w$column))
  }
}
columns <- c("spec", "outcome", "tutoring", "controls", "rows", "effects", "weights", "errors", "estimate",
             "std_error", "df", "n_obs", "n_params", "r2", "max_leverage", "status")
table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
  x <- r[[c]]
  if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
}, "")), check.names = FALSE)
write.csv(table, file.path(out, "school-panel-leverage-expected.csv"), row.names = FALSE, quote = TRUE)
write.csv(do.call(rbind, coefficients), file.path(out, "school-panel-leverage-coefficients.csv"),
          row.names = FALSE, quote = TRUE)

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/two-way-leverage-reference.R"), file.path(out, "two-way-leverage-versions.txt"))
