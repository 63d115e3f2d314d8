# Reference values for Forkscape's estimation tests, computed with R's lm and the sandwich package
# (Zeileis 2004, "Econometric computing with HC and HAC covariance matrix estimators", Journal of
# Statistical Software 11(10); Zeileis, Koell & Graham 2020, "Various versatile variances: an
# object-oriented implementation of clustered covariances in R", Journal of Statistical Software 95(1)).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/make-reference.R
#
# It rewrites every file in src/test/resources/reference/ except the plan files (*-plan.json), which
# are written by hand. The tests read only the committed output, so R is not needed to run them.
#
# What it writes:
#   airquality.csv, chickweight.csv, toothgrowth.csv
#                                    data sets shipped with R, categorical columns as text
#   longley.csv                      datasets::longley in the units of NIST StRD's Longley data
#   *-expected.csv                   per specification of the plan of the same name: the key estimate,
#                                    its standard error, df, p-value, interval, rows, coefficients,
#                                    R-squared, adjusted R-squared, the overall F test's p-value, the
#                                    standardized coefficient and the partial correlation
#   nist-lm.csv                      lm() on Longley, Wampler1 and Wampler2, to cross-check the
#                                    certified values that the tests type in
#   distributions.csv                qt, pt and pf at chosen points, for the engine's t and F functions
#   versions.txt                     the R and sandwich versions that produced all of the above
#
# The plans are not parsed (no JSON package is needed): each one's multiverse is written out below
# with loops, in the plan's decision order with the last decision varying fastest, so the spec
# numbers written here are Forkscape's specification numbers (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}

# 17 significant digits: enough to read back the same double.
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# Writes a data set as Forkscape reads it, then reads it back, so every reference value is computed
# from exactly the numbers the tests load.
write_data <- function(d, name) {
  path <- file.path(out, name)
  write.csv(d, path, row.names = FALSE, na = "", quote = FALSE)
  read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)
}

# --- data ------------------------------------------------------------------------------------------

air <- datasets::airquality
air$Month <- month.abb[air$Month]
air <- write_data(air, "airquality.csv")

chick <- data.frame(
  weight = datasets::ChickWeight$weight,
  Time = datasets::ChickWeight$Time,
  Chick = sprintf("C%02d", as.integer(as.character(datasets::ChickWeight$Chick))),
  Diet = paste0("D", as.character(datasets::ChickWeight$Diet)))
chick <- write_data(chick, "chickweight.csv")

tooth <- write_data(datasets::ToothGrowth[, c("len", "supp", "dose")], "toothgrowth.csv")

# NIST StRD Longley units: y = Employed (thousands of people), x2 = GNP (thousands of dollars) and so on.
L <- datasets::longley
longley <- data.frame(
  y = round(L$Employed * 1000),
  x1 = L$GNP.deflator,
  x2 = round(L$GNP * 1000),
  x3 = round(L$Unemployed * 10),
  x4 = round(L$Armed.Forces * 10),
  x5 = round(L$Population * 1000),
  x6 = L$Year)
longley <- write_data(longley, "longley.csv")

# --- codings and sample rules, as the plan file defines them ----------------------------------------

# Categorical columns enter as factors whose levels are in sorted (code point) order, so the first level
# is the reference level, as in Forkscape.
as_levels <- function(x) factor(x, levels = sort(unique(x[!is.na(x)]), method = "radix"))

# Codings use the non-missing values of the rows kept by the sample rules.
code <- function(x, transform) {
  if (transform == "none") {
    return(x)
  }
  if (transform == "log") {
    return(log(x))
  }
  if (transform == "log1p") {
    return(log1p(x))
  }
  if (transform == "sqrt") {
    return(sqrt(x))
  }
  if (transform == "standardize") {
    return((x - mean(x, na.rm = TRUE)) / sd(x, na.rm = TRUE))
  }
  if (startsWith(transform, "winsorize:")) {
    f <- as.numeric(sub("winsorize:", "", transform, fixed = TRUE))
    q <- quantile(x, c(f, 1 - f), type = 7, na.rm = TRUE, names = FALSE)
    return(pmin(pmax(x, q[1]), q[2]))
  }
  stop("unknown transform ", transform)
}

# A keep rule drops the rows where it is false or touches a missing value.
keep_rows <- function(d, keep) d[!is.na(keep) & keep, , drop = FALSE]

# A z-score trim: mean and sd over the rows still kept, rows missing the column stay.
trim_rows <- function(d, column, z) {
  x <- d[[column]]
  score <- abs(x - mean(x, na.rm = TRUE)) / sd(x, na.rm = TRUE)
  d[is.na(x) | score <= z, , drop = FALSE]
}

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")

# Optional controls of all-subsets alternative `mask`: bit j set means optional control j is in.
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

# --- one fit, every error type ------------------------------------------------------------------------

# Fits .y on the controls, the absorbed fixed effects (as explicit dummies) and .x, on the rows complete
# on every variable the specification uses (its cluster column too, for cluster errors only), and returns
# one row per error type.
fit_errors <- function(d, controls, absorb, errors, confidence) {
  lapply(errors, function(e) {
    cluster <- if (startsWith(e, "cluster:")) sub("cluster:", "", e, fixed = TRUE) else character(0)
    fit_one(d, controls, absorb, e, cluster, confidence)
  })
}

fit_one <- function(d, controls, absorb, e, cluster, confidence) {
  used <- unique(c(".y", ".x", controls, absorb, cluster))
  m <- na.omit(d[, used, drop = FALSE])
  for (v in c(controls, absorb)) {
    if (is.character(m[[v]])) {
      m[[v]] <- as_levels(m[[v]])
    }
  }
  terms <- c(sprintf("`%s`", controls), if (length(absorb) > 0) sprintf("`%s`", absorb), ".x")
  fit <- lm(reformulate(terms, response = ".y"), data = m)
  s <- summary(fit)
  estimate <- unname(coef(fit)[".x"])
  fstat <- s$fstatistic
  status <- "ok"
  df <- fit$df.residual
  if (e == "classical") {
    v <- vcov(fit)
  } else if (e %in% c("HC2", "HC3") && any(hatvalues(fit) > 1 - 1e-10)) {
    # HC2 and HC3 divide by 1 - h_i: undefined when a row's leverage is 1 (to rounding)
    status <- "undefined: leverage 1"
  } else if (e %in% c("HC0", "HC1", "HC2", "HC3")) {
    v <- vcovHC(fit, type = e)
  } else {
    cl <- as.character(m[[cluster]])
    # CR1: G/(G-1) (N-1)/(N-K), with G - 1 degrees of freedom for tests and intervals
    v <- vcovCL(fit, cluster = cl, type = "HC1", cadjust = TRUE)
    df <- length(unique(cl)) - 1
  }
  se <- NA
  if (status == "ok") {
    se <- sqrt(v[".x", ".x"])
  } else {
    df <- NA
  }
  t <- estimate / se
  half <- qt(1 - (1 - confidence) / 2, df) * se
  # the standardized coefficient: the same regression with outcome and key predictor in standard
  # deviations over these rows (Cohen, Cohen, West & Aiken 2003)
  z <- m
  z$.y <- as.numeric(scale(z$.y))
  z$.x <- as.numeric(scale(z$.x))
  std_estimate <- unname(coef(lm(reformulate(terms, response = ".y"), data = z))[".x"])
  # the partial correlation: with classical errors, the correlation of outcome and key predictor after both
  # are residualised on the controls and fixed effects (Greene 2012, chapter 3); with robust errors, the one
  # their t statistic implies, t / sqrt(t^2 + df)
  others <- terms[terms != ".x"]
  partial <- if (e == "classical") {
    cor(resid(lm(reformulate(c("1", others), response = ".y"), data = m)),
        resid(lm(reformulate(c("1", others), response = ".x"), data = m)))
  } else {
    t / sqrt(t^2 + df)
  }
  list(errors = e, estimate = estimate, n_obs = nobs(fit), n_params = fit$rank, r2 = s$r.squared,
       std_estimate = std_estimate, partial_correlation = if (status == "ok") partial else NA,
       adj_r2 = s$adj.r.squared,
       model_p_value = unname(pf(fstat["value"], fstat["numdf"], fstat["dendf"], lower.tail = FALSE)),
       std_error = se, df = df, p_value = 2 * pt(-abs(t), df), ci_low = estimate - half, ci_high = estimate + half,
       status = status)
}

stat_columns <- c("estimate", "std_error", "df", "p_value", "ci_low", "ci_high", "n_obs", "n_params", "r2",
                  "adj_r2", "model_p_value", "std_estimate", "partial_correlation")

# Collects rows (lists) into the expected-values file: spec, one column per decision, the statistics.
write_expected <- function(rows, decision_names, name) {
  table <- data.frame(spec = vapply(rows, function(r) as.character(r$spec), ""), check.names = FALSE)
  for (i in seq_along(decision_names)) {
    table[[decision_names[i]]] <- vapply(rows, function(r) r$labels[[i]], "")
  }
  for (s in stat_columns) {
    table[[s]] <- vapply(rows, function(r) num(as.numeric(r[[s]])), "")
  }
  table$status <- vapply(rows, function(r) r$status, "")
  write.csv(table, file.path(out, name), row.names = FALSE, quote = TRUE)
}

# --- plan airquality-plan.json: per-specification missing rows ----------------------------------------

airquality_plan <- function() {
  outcomes <- list(list(label = "ozone", column = "Ozone", transform = "none"),
                   list(label = "log ozone", column = "Ozone", transform = "log"),
                   list(label = "ozone z", column = "Ozone", transform = "standardize"))
  predictors <- list(list(label = "temp", column = "Temp", transform = "none"),
                     list(label = "temp winsorized", column = "Temp", transform = "winsorize:0.05"),
                     list(label = "temp z", column = "Temp", transform = "standardize"))
  optional <- c("Wind", "Solar.R", "Month")
  errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:Month", "cluster:Solar.R")
  rows <- list()
  spec <- 0
  for (o in outcomes) for (p in predictors) for (mask in 0:7) for (season in 1:2) for (outliers in 1:2) {
    d <- air
    if (season == 2) d <- keep_rows(d, d$Month != "Sep")
    if (outliers == 2) d <- trim_rows(d, "Solar.R", 1.5)
    d$.y <- code(d[[o$column]], o$transform)
    d$.x <- code(d[[p$column]], p$transform)
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, controls, character(0), errors, 0.95)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list(o$label, p$label, subset_label(controls), c("all months", "no September")[season],
                       c("kept", "trimmed")[outliers], r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "temperature", "controls", "season", "radiation outliers", "errors"),
                 "airquality-expected.csv")
}

# --- plan airquality-common-plan.json: rows complete on every plan variable -------------------------------

airquality_common_plan <- function() {
  outcomes <- list(list(label = "ozone", transform = "none"), list(label = "log ozone", transform = "log"))
  predictors <- list(list(label = "temp", column = "Temp"), list(label = "wind", column = "Wind"))
  optional <- c("Solar.R", "Month")
  errors <- c("HC1", "HC3", "cluster:Month")
  plan_variables <- c("Ozone", "Temp", "Wind", "Solar.R", "Month")
  common <- air[complete.cases(air[, plan_variables]), ]
  rows <- list()
  spec <- 0
  for (o in outcomes) for (p in predictors) for (mask in 0:3) for (days in 1:2) for (a in list(character(0), "Month")) {
    d <- common
    if (days == 2) d <- keep_rows(d, d$Day <= 15 | d$Temp > 80)
    d$.y <- code(d$Ozone, o$transform)
    d$.x <- d[[p$column]]
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, controls, a, errors, 0.90)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list(o$label, p$label, subset_label(controls), c("all days", "early or hot")[days], if (length(a)) "month" else "none", r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "weather", "controls", "days", "fe", "errors"), "airquality-common-expected.csv")
}

# --- plan chickweight-plan.json: absorbed fixed effects and clusters ----------------------------------

chickweight_plan <- function() {
  outcomes <- list(list(label = "weight", transform = "none"), list(label = "log weight", transform = "log"))
  predictors <- list(list(label = "days", transform = "none"), list(label = "days z", transform = "standardize"))
  optional <- c("Diet")
  samples <- c("all", "from day 2", "weight trimmed")
  absorbs <- list(list(label = "none", columns = character(0)), list(label = "chick", columns = "Chick"))
  errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:Chick", "cluster:Diet")
  rows <- list()
  spec <- 0
  for (o in outcomes) for (p in predictors) for (mask in 0:1) for (sample in 1:3) for (a in absorbs) {
    d <- chick
    if (sample == 2) d <- keep_rows(d, d$Time >= 2)
    if (sample == 3) d <- trim_rows(d, "weight", 2)
    d$.y <- code(d$weight, o$transform)
    d$.x <- code(d$Time, p$transform)
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, controls, a$columns, errors, 0.95)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list(o$label, p$label, subset_label(controls), samples[sample], a$label, r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "age", "diet", "rows", "chick effects", "errors"), "chickweight-expected.csv")
}

# --- plan toothgrowth-plan.json: a two-level categorical key predictor ------------------------------------

toothgrowth_plan <- function() {
  outcomes <- list(list(label = "length", transform = "none"), list(label = "sqrt length", transform = "sqrt"),
                   list(label = "log1p length", transform = "log1p"))
  errors <- c("classical", "HC1", "HC3", "cluster:dose")
  rows <- list()
  spec <- 0
  for (o in outcomes) for (mask in 0:1) for (doses in 1:2) {
    d <- tooth
    if (doses == 2) d <- keep_rows(d, d$dose < 2)
    d$.y <- code(d$len, o$transform)
    # a two-level key predictor is coded 0 for its first level in sorted order (OJ) and 1 for the second (VC)
    d$.x <- as.numeric(d$supp == "VC")
    controls <- subset_of("dose", mask)
    for (r in fit_errors(d, controls, character(0), errors, 0.99)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list(o$label, "ascorbic acid", subset_label(controls), c("all doses", "below 2 mg")[doses],
                       r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "supplement", "dose", "doses", "errors"), "toothgrowth-expected.csv")
}

# --- NIST StRD designs through lm -----------------------------------------------------------------------

# Wampler1 and Wampler2 follow from their definition: y is a degree-5 polynomial in x = 0..20 with
# coefficients 1, 1, 1, 1, 1, 1 (Wampler1) and 1, 0.1, 0.01, 0.001, 0.0001, 0.00001 (Wampler2). Wampler2's y
# is formed as an integer numerator over 100000, so each value is the double nearest the exact decimal,
# as it is when read from NIST's file.
wampler <- function(which) {
  x <- 0:20
  y <- if (which == 1) 1 + x + x^2 + x^3 + x^4 + x^5
       else (100000 + 10000 * x + 1000 * x^2 + 100 * x^3 + 10 * x^4 + x^5) / 100000
  data.frame(y = y, x1 = x, x2 = x^2, x3 = x^3, x4 = x^4, x5 = x^5)
}

nist_lm <- function() {
  designs <- list(Longley = longley, Wampler1 = wampler(1), Wampler2 = wampler(2))
  rows <- list()
  for (name in names(designs)) {
    d <- designs[[name]]
    fit <- lm(y ~ ., data = d)
    # Wampler1 and Wampler2 fit exactly; summary() warns that its figures then rest on rounding alone
    s <- suppressWarnings(summary(fit))
    cf <- coef(s)
    for (term in rownames(cf)) {
      rows[[length(rows) + 1]] <- c(name, if (term == "(Intercept)") "b0" else sub("x", "b", term),
                                    num(cf[term, "Estimate"]), num(cf[term, "Std. Error"]))
    }
    rows[[length(rows) + 1]] <- c(name, "residual_sd", num(s$sigma), "")
    rows[[length(rows) + 1]] <- c(name, "r2", num(s$r.squared), "")
  }
  table <- as.data.frame(do.call(rbind, rows))
  names(table) <- c("dataset", "quantity", "value", "std_error")
  write.csv(table, file.path(out, "nist-lm.csv"), row.names = FALSE, quote = TRUE)
}

# --- Student t and F: quantiles and tail probabilities ------------------------------------------------

distributions <- function() {
  rows <- list()
  add <- function(kind, df1, df2, x, value) rows[[length(rows) + 1]] <<- c(kind, num(df1), num(df2), num(x), num(value))
  for (df in c(1, 2, 3, 4, 5, 9, 14, 29, 49, 113, 527, 5000, 1e6)) {
    for (confidence in c(0.8, 0.9, 0.95, 0.99, 0.999)) {
      add("t_quantile", df, NA, confidence, qt(1 - (1 - confidence) / 2, df))
    }
    for (t in c(0, 0.3, 1, 1.96, 3, 6, 12, 25, 60)) {
      add("t_two_sided_p", df, NA, t, 2 * pt(-t, df))
    }
  }
  for (d in list(c(1, 10), c(2, 113), c(5, 30), c(50, 527), c(3, 1e5))) {
    for (f in c(0.1, 1, 2.5, 8, 40, 300)) {
      add("f_upper_p", d[1], d[2], f, pf(f, d[1], d[2], lower.tail = FALSE))
    }
  }
  table <- as.data.frame(do.call(rbind, rows))
  names(table) <- c("kind", "df1", "df2", "x", "value")
  write.csv(table, file.path(out, "distributions.csv"), row.names = FALSE, quote = TRUE)
}

airquality_plan()
airquality_common_plan()
chickweight_plan()
toothgrowth_plan()
nist_lm()
distributions()
writeLines(c(paste("R:", R.version.string),
             paste("sandwich:", as.character(packageVersion("sandwich"))),
             "script: src/test/r/make-reference.R"),
           file.path(out, "versions.txt"))
