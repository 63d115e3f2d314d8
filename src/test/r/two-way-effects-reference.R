# Reference values for Forkscape's absorption of two crossed fixed-effect columns, computed with R's lm with
# explicit factor() dummies for every fixed-effect column, and sandwich::vcovHC / vcovCL (Zeileis 2004,
# "Econometric computing with HC and HAC covariance matrix estimators", Journal of Statistical Software
# 11(10); Zeileis, Koell & Graham 2020, "Various versatile variances", Journal of Statistical Software 95(1)).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/two-way-effects-reference.R
#
# It writes, under src/test/resources/reference/:
#   school-panel.csv               an invented, unbalanced panel of pupils over terms, generated here with a
#                                  fixed seed (below): two schools whose pupils and terms never meet, so that
#                                  the pupil-term graph has two connected components; pupils seen in one term
#                                  only (singletons); a control constant within pupils, one constant within
#                                  terms, and one with missing cells
#   school-panel-expected.csv      per specification of school-panel-plan.json (written by hand): the key
#                                  estimate, its standard error, df, rows, coefficients (lm's rank), R-squared,
#                                  the rank of the fixed-effect dummies alone, and the status
#   two-way-versions.txt           the R and sandwich versions that produced both
#
# The plan is not parsed: its multiverse is written out below with loops, in the plan's decision order with
# the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: school A, 30 pupils over terms 1-6; school B, 20 pupils over terms 7-10; about 20% unobserved ----

set.seed(20261203)
a <- expand.grid(term = 1:6, pupil = sprintf("A%02d", 1:30), stringsAsFactors = FALSE)
b <- expand.grid(term = 7:10, pupil = sprintf("B%02d", 1:20), stringsAsFactors = FALSE)
a$school <- "A"
b$school <- "B"
panel <- rbind(a, b)[, c("pupil", "term", "school")]
panel <- panel[runif(nrow(panel)) > 0.2, ]
# a pupil who joined for one term only: a singleton level of the pupil effects
panel <- rbind(panel, data.frame(pupil = "B21", term = 8, school = "B"))
pupils <- sort(unique(panel$pupil))
n <- nrow(panel)
pupil_effect <- rnorm(length(pupils))[match(panel$pupil, pupils)]
term_effect <- rnorm(10, sd = 0.7)[panel$term]
panel$term <- sprintf("T%02d", panel$term)
panel$home_support <- round(rnorm(length(pupils)), 2)[match(panel$pupil, pupils)] + round(0.5 * pupil_effect, 2)
panel$class_size <- round(25 + 3 * rnorm(10), 0)[as.integer(sub("T", "", panel$term))]
panel$attendance <- round(0.9 + 0.05 * rnorm(n), 3)
panel$tutoring_hours <- round(pmax(0, 2 + 0.8 * pupil_effect + 0.5 * term_effect + rnorm(n)), 2)
panel$score <- round(50 + 1.5 * panel$tutoring_hours + 3 * pupil_effect + 2 * term_effect + 10 * panel$attendance
                     - 0.2 * panel$class_size + 0.8 * panel$home_support
                     + rnorm(n, sd = 1 + 0.3 * abs(pupil_effect)), 3)
panel$attendance[runif(n) < 0.08] <- NA
path <- file.path(out, "school-panel.csv")
write.csv(panel, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

# --- one specification ------------------------------------------------------------------------------------

# Fits .y on the controls, the dummies of every absorbed column and .x, on the rows complete on every
# variable the specification uses (its cluster columns too), as Forkscape's statuses order the checks.
fit_one <- function(d, controls, absorb, e) {
  cluster <- if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+", fixed = TRUE)[[1]]
             else character(0)
  used <- unique(c(".y", ".x", controls, absorb, cluster))
  m <- na.omit(d[, used, drop = FALSE])
  for (f in absorb) m[[f]] <- factor(m[[f]])
  # the rank of the fixed-effect dummies alone (with the intercept they span)
  base <- if (length(absorb) > 0) qr(model.matrix(reformulate(sprintf("`%s`", absorb)), data = m))$rank else 1
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, r2 = NA,
              effects_rank = base, status = "ok")
  if (nrow(m) <= base) {
    row$status <- "too few rows"
    return(row)
  }
  terms <- c(sprintf("`%s`", controls), if (length(absorb) > 0) sprintf("`%s`", absorb), ".x")
  fit <- lm(reformulate(terms, response = ".y"), data = m)
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

# --- plan school-panel-plan.json ----------------------------------------------------------------------------

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

outcomes <- list(list(label = "score", log = FALSE), list(label = "log score", log = TRUE))
optional <- c("attendance", "class_size", "home_support")
samples <- list(list(label = "both schools", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "school A", keep = function(d) d$school == "A"))
absorbs <- list(list(label = "none", columns = character(0)), list(label = "pupil", columns = "pupil"),
                list(label = "term", columns = "term"), list(label = "pupil and term", columns = c("pupil", "term")))
errors <- c("classical", "HC0", "HC1", "cluster:pupil", "cluster:pupil+term")
rows <- list()
spec <- 0
for (o in outcomes) for (mask in 0:7) for (s in samples) for (a in absorbs) for (e in errors) {
  d <- d_all[s$keep(d_all), ]
  d$.y <- if (o$log) log(d$score) else d$score
  d$.x <- d$tutoring_hours
  controls <- subset_of(optional, mask)
  r <- fit_one(d, controls, a$columns, e)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = o$label, tutoring = "hours", controls = subset_label(controls),
                         rows = s$label, effects = a$label), r)
}
columns <- c("spec", "outcome", "tutoring", "controls", "rows", "effects", "errors", "estimate", "std_error", "df",
             "n_obs", "n_params", "r2", "effects_rank", "status")
table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
  x <- r[[c]]
  if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
}, "")), check.names = FALSE)
write.csv(table, file.path(out, "school-panel-expected.csv"), row.names = FALSE, quote = TRUE)

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/two-way-effects-reference.R"), file.path(out, "two-way-versions.txt"))
