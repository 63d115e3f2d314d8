# Reference values for Forkscape's generalized linear models (logit, probit, Poisson), computed with R's
# glm (iteratively reweighted least squares; McCullagh & Nelder 1989, "Generalized Linear Models", 2nd ed.,
# Chapman & Hall) and the sandwich package (Zeileis 2006, "Object-oriented computation of sandwich
# estimators", Journal of Statistical Software 16(9); Zeileis, Koell & Graham 2020, "Various versatile
# variances: an object-oriented implementation of clustered covariances in R", Journal of Statistical
# Software 95(1)). Least-squares specifications of the same plans go through lm, as in make-reference.R.
#
# Run from the repository root, with Debian's r-base-core, r-cran-sandwich and r-cran-mass installed:
#
#     Rscript src/test/r/glm-reference.R
#
# It rewrites every file in src/test/resources/reference/glm/ except the plan files (*-plan.json), which
# are written by hand, and statsmodels-margins.csv and statsmodels-versions.txt, which
# src/test/python/glm-margins-reference.py writes.
# The tests read only the committed output, so R is not needed to run them.
#
# What it writes:
#   birthwt.csv        MASS::birthwt (Hosmer & Lemeshow 1989, "Applied Logistic Regression", Wiley), race as
#                      text levels
#   quine.csv          MASS::quine (days absent from school; Venables & Ripley 2002, "Modern Applied
#                      Statistics with S", 4th ed., Springer)
#   dobson.csv         the Poisson example of Dobson (1990), "An Introduction to Generalized Linear Models",
#                      Chapman & Hall, p. 93, as R's ?glm example enters it, with 0/1 columns for the
#                      outcome levels 2 and 3 and the treatment as text levels
#   school.csv         an invented exam scenario, generated here with a fixed seed, whose outcome a practice
#                      score separates completely
#   *-expected.csv     per specification of the plan of the same name, see stat_columns below
#   stopping-gap.txt   how far from the reference Forkscape's stopping rule may leave each quantity
#   versions.txt       the R, sandwich and MASS versions that produced all of the above
#
# The plans are not parsed: each one's multiverse is written out below with loops, in the plan's decision
# order with the last decision varying fastest, so the spec numbers written here are Forkscape's (1-based).

suppressPackageStartupMessages({
  library(sandwich)
  library(MASS)
})

out <- file.path("src", "test", "resources", "reference", "glm")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}

# 17 significant digits: enough to read back the same double.
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# Writes a data set as Forkscape reads it, then reads it back, so every reference value is computed from
# exactly the numbers the tests load.
write_data <- function(d, name) {
  path <- file.path(out, name)
  write.csv(d, path, row.names = FALSE, na = "", quote = FALSE)
  read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)
}

# --- data ------------------------------------------------------------------------------------------

bw <- MASS::birthwt
bw$race <- c("white", "black", "other")[bw$race]
bw <- write_data(bw, "birthwt.csv")

qu <- MASS::quine
for (v in c("Eth", "Sex", "Age", "Lrn")) qu[[v]] <- as.character(qu[[v]])
qu <- write_data(qu, "quine.csv")

dobson <- data.frame(counts = c(18, 17, 15, 20, 10, 20, 25, 13, 12),
                     outcome = paste0("o", rep(1:3, 3)),
                     treatment = paste0("t", rep(1:3, each = 3)))
dobson$outcome2 <- as.integer(dobson$outcome == "o2")
dobson$outcome3 <- as.integer(dobson$outcome == "o3")
dobson <- write_data(dobson, "dobson.csv")

# Invented: 120 pupils, their tutoring hours, a practice-test score that rises with them, the distance to
# school; the exam is passed exactly when the practice score is above 55, so the score separates the
# outcome completely, while tutoring hours and distance overlap between the two groups.
set.seed(20261202)
n_school <- 120
tutoring <- round(runif(n_school, 0, 20), 1)
practice <- round(40 + 1.2 * tutoring + rnorm(n_school, 0, 10), 1)
school <- data.frame(passed = as.integer(practice > 55), tutoring_hours = tutoring, practice_score = practice,
                     distance_km = round(rexp(n_school, 1 / 4), 2))
school <- write_data(school, "school.csv")

# --- codings, as the plan file defines them ----------------------------------------------------------

# Categorical columns enter as factors whose levels are in sorted (code point) order, so the first level
# is the reference level, as in Forkscape.
as_levels <- function(x) factor(x, levels = sort(unique(x[!is.na(x)]), method = "radix"))

code <- function(x, transform) {
  if (transform == "none") {
    return(x)
  }
  if (transform == "standardize") {
    return((x - mean(x, na.rm = TRUE)) / sd(x, na.rm = TRUE))
  }
  stop("unknown transform ", transform)
}

# A two-level categorical key predictor is coded 0 for its first level in sorted order and 1 for the other.
key_code <- function(x) {
  if (!is.character(x)) {
    return(x)
  }
  levels <- sort(unique(x[!is.na(x)]), method = "radix")
  stopifnot(length(levels) == 2)
  as.numeric(x == levels[2])
}

keep_rows <- function(d, keep) d[!is.na(keep) & keep, , drop = FALSE]

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")

# Optional controls of all-subsets alternative `mask`: bit j set means optional control j is in.
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

# --- the three models, with the derivatives the marginal effects need ------------------------------------

# For each model: the family for glm, and the inverse link mu(eta) with its first two derivatives, written
# out rather than taken from the family object, whose mu.eta is clipped at machine epsilon.
models <- list(
  logit = list(family = binomial(link = "logit"),
               mu = function(eta) plogis(eta),
               d1 = function(eta) dlogis(eta),
               # d/deta of p(1 - p) is p(1 - p)(1 - 2p)
               d2 = function(eta) dlogis(eta) * (1 - 2 * plogis(eta))),
  probit = list(family = binomial(link = "probit"),
                mu = function(eta) pnorm(eta),
                d1 = function(eta) dnorm(eta),
                # d/deta of phi(eta) is -eta phi(eta)
                d2 = function(eta) -eta * dnorm(eta)),
  poisson = list(family = poisson(link = "log"),
                 mu = function(eta) exp(eta),
                 d1 = function(eta) exp(eta),
                 d2 = function(eta) exp(eta)))

# R's glm.fit stops when |dev - devold| / (|dev| + 0.1) < epsilon. Forkscape's IRLS stops at 1e-10 once the
# Newton decrement d' I d of its step is also below DECREMENT (logit and Poisson scoring is Newton's method
# and converges quadratically, probit's converges linearly). The references are taken much further, so that
# they stand for the maximum-likelihood estimate itself.
REFERENCE_EPSILON <- 1e-14
ENGINE_EPSILON <- 1e-10
DECREMENT <- c(logit = 1e-8, poisson = 1e-8, probit = 1e-15)

glm_fit <- function(formula, model, m, epsilon, start = NULL) {
  glm(formula, family = models[[model]]$family, data = m, start = start,
      control = glm.control(epsilon = epsilon, maxit = 100))
}

# glm's vcov and the working weights that sandwich reads are those of the last iteration's start, one step
# behind its coefficients (2e-8 relative in a standard error here, even at epsilon 1e-14). Fits started at
# the previous estimate take one more step each, until the covariance agrees with the information computed
# at the fit's own coefficients; probit's scoring converges linearly and needs a few of them.
glm_at_estimate <- function(formula, model, m) {
  fit <- glm_fit(formula, model, m, REFERENCE_EPSILON)
  if (fit$deviance < 1e-6) {
    return(fit)
  }
  for (restart in 1:50) {
    fit <- glm_fit(formula, model, m, REFERENCE_EPSILON, start = coef(fit))
    lag <- max(abs(sqrt(diag(vcov(fit))) / sqrt(diag(information_covariance(fit, model))) - 1))
    if (lag < 1e-13) {
      return(fit)
    }
  }
  stop(model, " ", deparse(formula), ": covariance still ", lag, " away from the information at the estimate")
}

# The inverse expected information at a fit's final coefficients, X' W X with W = mu'(eta)^2 / V(mu).
information_covariance <- function(fit, model) {
  f <- models[[model]]
  x <- model.matrix(fit)
  eta <- drop(x %*% coef(fit))
  w <- f$d1(eta)^2 / fit$family$variance(f$mu(eta))
  solve(crossprod(x * sqrt(w)))
}

# The inverse expected information at coefficients b.
information_at <- function(x, b, model) {
  f <- models[[model]]
  eta <- drop(x %*% b)
  w <- f$d1(eta)^2 / f$family$variance(f$mu(eta))
  solve(crossprod(x * sqrt(w)))
}

# Forkscape's stopping rule, emulated from glm's fit at ENGINE_EPSILON: scoring steps d = I^-1 U (U the
# score) follow until the next one's decrement d' I d = U' I^-1 U is below the link's threshold.
engine_coefficients <- function(fit, model) {
  f <- models[[model]]
  x <- model.matrix(fit)
  b <- coef(fit)
  for (step in 1:100) {
    eta <- drop(x %*% b)
    mu <- f$mu(eta)
    u <- colSums(x * ((fit$y - mu) * f$d1(eta) / f$family$variance(mu)))
    d <- drop(information_at(x, b, model) %*% u)
    if (sum(u * d) < DECREMENT[[model]]) {
      return(b)
    }
    b <- b + d
  }
  stop("scoring did not reach the decrement threshold")
}

# Largest relative change of each quantity between the coefficients that rule stops at and the reference,
# over every GLM specification, each evaluated at the stopped coefficients (the classical errors from the
# information there): how much of a disagreement the engine's stopping rule alone can explain.
stopping_gap <- new.env()
note_gap <- function(model, what, engine, reference, scale = abs(reference)) {
  key <- paste0(what, " (", model, ")")
  stopping_gap[[key]] <- max(c(stopping_gap[[key]], abs(engine - reference) / scale))
}

# --- one specification, every error type --------------------------------------------------------------

# Fits .y on the controls, the absorbed fixed effects (as factor dummies) and .x, on the rows complete on
# every variable the specification uses (its cluster column too, for cluster errors only), and returns
# one row per error type. `separated` names a control that separates the outcome by construction.
fit_errors <- function(d, model, controls, absorb, errors, confidence, separated = character(0)) {
  lapply(errors, function(e) {
    cluster <- if (startsWith(e, "cluster:")) sub("cluster:", "", e, fixed = TRUE) else character(0)
    used <- unique(c(".y", ".x", controls, absorb, cluster))
    m <- na.omit(d[, used, drop = FALSE])
    for (v in controls) {
      if (is.character(m[[v]])) {
        m[[v]] <- as_levels(m[[v]])
      }
    }
    for (v in absorb) {
      m[[v]] <- as_levels(as.character(m[[v]]))
    }
    terms <- c(sprintf("`%s`", controls), sprintf("`%s`", absorb), ".x")
    formula <- reformulate(terms, response = ".y")
    r <- if (model == "ols") {
      ols_one(m, formula, e, cluster, confidence)
    } else {
      glm_one(m, formula, model, absorb, e, cluster, confidence, any(controls %in% separated))
    }
    r$errors <- e
    r
  })
}

# The chosen covariance matrix of every coefficient, or a status saying why there is none.
covariance <- function(fit, e, cluster, m) {
  if (e == "classical") {
    # binomial and Poisson: dispersion fixed at 1, the inverse expected information
    return(list(v = vcov(fit), status = "ok"))
  }
  if (e %in% c("HC2", "HC3") && any(hatvalues(fit) > 1 - 1e-10)) {
    # HC2 and HC3 divide by 1 - h_i: undefined when a row's leverage is 1 (to rounding)
    return(list(v = NULL, status = "undefined: leverage 1"))
  }
  if (e %in% c("HC0", "HC1", "HC2", "HC3")) {
    return(list(v = vcovHC(fit, type = e), status = "ok"))
  }
  # vcovCL's default type: HC0 for a glm, G/(G-1) alone; HC1 for lm, CR1's G/(G-1) (N-1)/(N-K)
  type <- if (inherits(fit, "glm")) "HC0" else "HC1"
  list(v = vcovCL(fit, cluster = as.character(m[[cluster]]), type = type, cadjust = TRUE), status = "ok")
}

empty_row <- function(status, n_obs, n_params) {
  list(estimate = NA, std_error = NA, statistic = NA, df = NA, p_value = NA, ci_low = NA, ci_high = NA,
       effect = NA, effect_std_error = NA, n_obs = n_obs, n_params = n_params, r2 = NA, adj_r2 = NA,
       model_p_value = NA, deviance = NA, status = status)
}

ols_one <- function(m, formula, e, cluster, confidence) {
  fit <- lm(formula, data = m)
  stopifnot(fit$rank == ncol(model.matrix(fit)))
  s <- summary(fit)
  fstat <- s$fstatistic
  estimate <- unname(coef(fit)[".x"])
  cv <- if (e == "classical") list(v = vcov(fit), status = "ok") else covariance(fit, e, cluster, m)
  df <- if (startsWith(e, "cluster:")) length(unique(m[[cluster]])) - 1 else fit$df.residual
  r <- empty_row(cv$status, nobs(fit), fit$rank)
  r$estimate <- estimate
  r$r2 <- s$r.squared
  r$adj_r2 <- s$adj.r.squared
  r$model_p_value <- unname(pf(fstat["value"], fstat["numdf"], fstat["dendf"], lower.tail = FALSE))
  # the residual sum of squares, R's deviance(lm)
  r$deviance <- deviance(fit)
  if (cv$status != "ok") {
    return(r)
  }
  se <- sqrt(cv$v[".x", ".x"])
  half <- qt(1 - (1 - confidence) / 2, df) * se
  r$std_error <- se
  r$statistic <- estimate / se
  r$df <- df
  r$p_value <- 2 * pt(-abs(estimate / se), df)
  r$ci_low <- estimate - half
  r$ci_high <- estimate + half
  # a linear model's marginal effect is its coefficient
  r$effect <- estimate
  r$effect_std_error <- se
  r
}

# Average marginal effect of .x on the outcome's scale and its gradient with respect to the coefficients.
#   continuous key:  AME = mean_i mu'(eta_i) * b_k
#                    gradient_j = mean_i(mu''(eta_i) x_ij) * b_k + mean_i(mu'(eta_i)) * [j = k]
#   0/1 key:         AME = mean_i (mu(eta_i1) - mu(eta_i0)), eta_i1 and eta_i0 with x_ik set to 1 and 0
#                    gradient = mean_i (mu'(eta_i1) x_i1 - mu'(eta_i0) x_i0)
# Its variance is g' V g with the specification's own V (delta method).
marginal_effect <- function(x, b, model, v) {
  f <- models[[model]]
  if (all(x[, ".x"] %in% c(0, 1))) {
    x1 <- x
    x1[, ".x"] <- 1
    x0 <- x
    x0[, ".x"] <- 0
    eta1 <- drop(x1 %*% b)
    eta0 <- drop(x0 %*% b)
    effect <- mean(f$mu(eta1) - f$mu(eta0))
    g <- colMeans(f$d1(eta1) * x1 - f$d1(eta0) * x0)
  } else {
    eta <- drop(x %*% b)
    effect <- mean(f$d1(eta)) * b[[".x"]]
    g <- colMeans(f$d2(eta) * x) * b[[".x"]]
    g[".x"] <- g[".x"] + mean(f$d1(eta))
  }
  list(effect = effect, std_error = sqrt(drop(t(g) %*% v[names(g), names(g)] %*% g)))
}

glm_one <- function(m, formula, model, absorb, e, cluster, confidence, separated) {
  warnings <- character(0)
  fit <- withCallingHandlers(glm_at_estimate(formula, model, m),
                             warning = function(w) {
                               warnings <<- c(warnings, conditionMessage(w))
                               invokeRestart("muffleWarning")
                             })
  # complete separation: R's glm warns that fitted probabilities reached 0 or 1, and the deviance goes to 0
  r_separated <- any(grepl("fitted probabilities numerically 0 or 1", warnings)) && deviance(fit) < 1e-6
  if (separated != r_separated) {
    stop("separation by construction (", separated, ") and by R's glm (", r_separated, ") disagree")
  }
  if (separated) {
    return(empty_row("separation", nobs(fit), fit$rank))
  }
  if (length(warnings) > 0 || !fit$converged) {
    stop("glm did not fit cleanly: ", paste(warnings, collapse = "; "))
  }
  stopifnot(fit$rank == ncol(model.matrix(fit)))
  null_terms <- if (length(absorb) > 0) sprintf("`%s`", absorb) else "1"
  null_fit <- glm_at_estimate(reformulate(null_terms, response = ".y"), model, m)
  cv <- covariance(fit, e, cluster, m)
  r <- empty_row(cv$status, nobs(fit), fit$rank)
  estimate <- unname(coef(fit)[".x"])
  # log-likelihoods as logLik gives them (the Poisson one with its log(y!) term)
  ll <- as.numeric(logLik(fit))
  ll0 <- as.numeric(logLik(null_fit))
  r$estimate <- estimate
  # McFadden (1974), "Conditional logit analysis of qualitative choice behavior", in Zarembka (ed.),
  # Frontiers in Econometrics, Academic Press
  r$r2 <- 1 - ll / ll0
  r$model_p_value <- pchisq(2 * (ll - ll0), fit$rank - null_fit$rank, lower.tail = FALSE)
  r$deviance <- deviance(fit)
  if (cv$status != "ok") {
    return(r)
  }
  se <- sqrt(cv$v[".x", ".x"])
  half <- qnorm(1 - (1 - confidence) / 2) * se
  x <- model.matrix(fit)
  me <- marginal_effect(x, coef(fit), model, cv$v)
  r$std_error <- se
  r$statistic <- estimate / se
  r$p_value <- 2 * pnorm(-abs(estimate / se))
  r$ci_low <- estimate - half
  r$ci_high <- estimate + half
  r$effect <- me$effect
  r$effect_std_error <- me$std_error

  engine <- engine_coefficients(glm_fit(formula, model, m, ENGINE_EPSILON), model)
  engine_v <- information_at(x, engine, model)
  engine_me <- marginal_effect(x, engine, model, engine_v)
  classical_se <- sqrt(vcov(fit)[".x", ".x"])
  classical_me <- marginal_effect(x, coef(fit), model, vcov(fit))
  note_gap(model, "estimate", engine[[".x"]], estimate)
  note_gap(model, "estimate, change over its standard error", engine[[".x"]], estimate, classical_se)
  note_gap(model, "std_error (classical)", sqrt(engine_v[".x", ".x"]), classical_se)
  note_gap(model, "effect", engine_me$effect, me$effect)
  note_gap(model, "effect_std_error (classical)", engine_me$std_error, classical_me$std_error)
  engine_mu <- models[[model]]$mu(drop(x %*% engine))
  note_gap(model, "deviance", sum(fit$family$dev.resids(fit$y, engine_mu, 1)), r$deviance)
  r
}

stat_columns <- c("estimate", "std_error", "statistic", "df", "p_value", "ci_low", "ci_high", "effect",
                  "effect_std_error", "n_obs", "n_params", "r2", "adj_r2", "model_p_value", "deviance")

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

# --- plan birthwt-smoking-plan.json: a 0/1 key predictor, race fixed effects, clusters by age --------------

birthwt_smoking_plan <- function() {
  optional <- c("age", "lwt", "ptl", "ht")
  absorbs <- list(list(label = "none", columns = character(0)), list(label = "race", columns = "race"))
  errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:age")
  rows <- list()
  spec <- 0
  for (model in c("logit", "probit")) for (mask in 0:15) for (a in absorbs) {
    d <- bw
    d$.y <- d$low
    d$.x <- d$smoke
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, model, controls, a$columns, errors, 0.95)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list("low birth weight", "smoking", model, subset_label(controls), a$label, r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "exposure", "model", "controls", "fixed effects", "errors"),
                 "birthwt-smoking-expected.csv")
}

# --- plan birthwt-weight-plan.json: a continuous key, four models, a categorical control, a sample rule ----

birthwt_weight_plan <- function() {
  predictors <- list(list(label = "weight (lb)", transform = "none"),
                     list(label = "weight z", transform = "standardize"))
  optional <- c("age", "race", "smoke", "ht")
  errors <- c("classical", "HC1", "HC3", "cluster:age")
  rows <- list()
  spec <- 0
  for (p in predictors) for (model in c("ols", "logit", "probit", "poisson")) for (mask in 0:15) for (sample in 1:2) {
    d <- bw
    if (sample == 2) d <- keep_rows(d, d$ptl == 0)
    d$.y <- d$low
    d$.x <- code(d$lwt, p$transform)
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, model, controls, character(0), errors, 0.90)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list("low birth weight", p$label, model, subset_label(controls),
                       c("all births", "no premature labours")[sample], r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "mother's weight", "model", "controls", "births", "errors"),
                 "birthwt-weight-expected.csv")
}

# --- plan quine-plan.json: Poisson counts, a two-level categorical key, age-group fixed effects ------------

quine_plan <- function() {
  optional <- c("Sex", "Lrn")
  absorbs <- list(list(label = "none", columns = character(0)), list(label = "age group", columns = "Age"))
  errors <- c("classical", "HC0", "HC1", "HC2", "HC3")
  rows <- list()
  spec <- 0
  for (model in c("ols", "poisson")) for (mask in 0:3) for (a in absorbs) {
    d <- qu
    d$.y <- d$Days
    # A (first in sorted order) is coded 0, N is coded 1
    d$.x <- key_code(d$Eth)
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, model, controls, a$columns, errors, 0.95)) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list("days absent", "ethnicity", model, subset_label(controls), a$label, r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "group", "model", "controls", "fixed effects", "errors"), "quine-expected.csv")
}

# --- plan dobson-plan.json: the handbook's Poisson example ------------------------------------------------

dobson_plan <- function() {
  rows <- list()
  spec <- 0
  d <- dobson
  d$.y <- d$counts
  d$.x <- d$outcome2
  for (r in fit_errors(d, "poisson", c("outcome3", "treatment"), character(0), c("classical", "HC0"), 0.95)) {
    spec <- spec + 1
    r$spec <- spec
    r$labels <- list("counts", "outcome 2", "poisson", "outcome 3 and treatment", r$errors)
    rows[[spec]] <- r
  }
  write_expected(rows, c("outcome", "predictor", "model", "controls", "errors"), "dobson-expected.csv")
}

# --- plan school-plan.json: complete separation by one control ---------------------------------------------

school_plan <- function() {
  optional <- c("practice_score", "distance_km")
  rows <- list()
  spec <- 0
  for (model in c("logit", "probit")) for (mask in 0:3) {
    d <- school
    d$.y <- d$passed
    d$.x <- d$tutoring_hours
    controls <- subset_of(optional, mask)
    for (r in fit_errors(d, model, controls, character(0), c("classical", "HC1"), 0.95,
                         separated = "practice_score")) {
      spec <- spec + 1
      r$spec <- spec
      r$labels <- list("passed", "tutoring hours", model, subset_label(controls), r$errors)
      rows[[spec]] <- r
    }
  }
  write_expected(rows, c("outcome", "support", "model", "controls", "errors"), "school-expected.csv")
}

birthwt_smoking_plan()
birthwt_weight_plan()
quine_plan()
dobson_plan()
school_plan()
writeLines(c(sprintf(paste("# largest relative change over every GLM specification between the reference and glm",
                           "stopped at epsilon %g, then scored until the decrement is below %g (logit, Poisson)",
                           "or %g (probit)"), ENGINE_EPSILON, DECREMENT[["logit"]], DECREMENT[["probit"]]),
             vapply(sort(ls(stopping_gap)), function(k) sprintf("%s %.3g", k, stopping_gap[[k]]), "")),
           file.path(out, "stopping-gap.txt"))
writeLines(c(paste("R:", R.version.string),
             paste("sandwich:", as.character(packageVersion("sandwich"))),
             paste("MASS:", as.character(packageVersion("MASS"))),
             "script: src/test/r/glm-reference.R"),
           file.path(out, "versions.txt"))
