# Reference values for Forkscape's analytic weights, computed with R's lm(weights = w) and glm(weights = w)
# and sandwich's vcovHC and vcovCL on those weighted fits (Zeileis 2006, "Object-oriented computation of
# sandwich estimators", Journal of Statistical Software 16(9); Zeileis, Koell & Graham 2020, "Various
# versatile variances", Journal of Statistical Software 95(1)).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/weights-reference.R
#
# It writes, under src/test/resources/reference/:
#   water-survey.csv            an invented household survey of water use in 12 districts over 3 survey
#                               waves, generated here with a fixed seed (below): sampling weights with
#                               zeros (a whole district among them) and missing cells, a control with
#                               missing cells, a 0/1 outcome and a count outcome for the GLMs
#   water-survey-expected.csv   per specification of water-survey-plan.json (written by hand): estimate,
#                               standard error, df, rows, coefficients, R-squared, status, and for robust
#                               types the zero-weight rows of the specification's sample and sandwich's
#                               value when they are left in the fit (see below)
#   water-logit-expected.csv    per specification of water-logit-plan.json, water-probit-plan.json and
#   water-probit-expected.csv   water-poisson-plan.json (written by hand): estimate, standard error, rows,
#   water-poisson-expected.csv  coefficients, deviance,
#                               McFadden's R-squared, the average marginal effect and its error
#   weights-versions.txt        the R and sandwich versions that produced them
#
# Zero weights. lm.wfit leaves zero-weight rows out of the decomposition: coefficients, the residual
# variance, df.residual and R-squared are those of the positive-weight rows. sandwich 3.0.2 does not leave
# them out: its meat and its 1/n divide by all rows of the model matrix while bread.lm scales by the
# positive-weight count, so HC0, HC1 and cluster variances shrink by (n+/n)^2 and HC2/HC3 recycle hat
# values of the wrong length (R warns). Forkscape's contract (N = rows with positive weight) is the fit on
# the positive-weight rows, so the reference fits drop them first, and the column with_zero_rows records
# what sandwich gives with them left in, for the test to check the relation above.
#
# The plans are not parsed: their multiverses are written out below with loops, in each plan's decision
# order with the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: 12 districts x 3 waves, 10 households each, about 10% not surveyed ------------------------------

set.seed(20261203)
districts <- sprintf("D%02d", 1:12)
d <- expand.grid(k = 1:10, wave = 1:3, district = districts, stringsAsFactors = FALSE)
d <- d[runif(nrow(d)) > 0.1, c("district", "wave")]
n <- nrow(d)
district_effect <- rnorm(12, sd = 2)[match(d$district, districts)]
wave_effect <- c(-1, 0, 1)[d$wave]
d$urban <- as.integer(runif(12) < 0.5)[match(d$district, districts)]
d$household <- sample(1:6, n, replace = TRUE)
d$rooms <- round(d$household * 0.6 + runif(n, 1, 4))
d$garden <- round(pmax(0, rnorm(n, 40, 15) - 15 * d$urban + 3 * district_effect), 1)
d$use <- round(80 + 0.35 * d$garden + 9 * d$household + 6 * district_effect + 4 * wave_effect
               + rnorm(n, sd = 8 + 0.1 * d$garden), 2)
d$high <- as.integer(d$use > median(d$use))
d$repairs <- rpois(n, exp(-1 + 0.01 * d$garden + 0.1 * d$household))
d$weight <- round(runif(n, 0.3, 3), 3)
d$weight[runif(n) < 0.05] <- 0
d$weight[d$district == "D07"] <- 0
d$weight[runif(n) < 0.05] <- NA
d$household[runif(n) < 0.06] <- NA
path <- file.path(out, "water-survey.csv")
write.csv(d, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]
cluster_of <- function(e) if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+",
                                                              fixed = TRUE)[[1]] else character(0)

# The rows of one specification: complete on every variable it uses (weight and cluster columns too),
# then, when weighted, the positive-weight rows alone (see "Zero weights" above).
rows_of <- function(d, controls, absorb, e, weight) {
  used <- unique(c(".y", ".x", controls, absorb, cluster_of(e), weight))
  m <- na.omit(d[, used, drop = FALSE])
  zero <- if (length(weight) > 0) sum(m[[weight]] == 0) else 0
  all <- m
  if (length(weight) > 0) m <- m[m[[weight]] > 0, , drop = FALSE]
  list(m = m, all = all, zero = zero)
}

formula_of <- function(controls, absorb) {
  terms <- c(sprintf("`%s`", controls), if (length(absorb) > 0) sprintf("factor(`%s`)", absorb), ".x")
  reformulate(terms, response = ".y")
}

robust <- function(fit, e, m) {
  if (startsWith(e, "cluster:")) {
    cl <- as.data.frame(lapply(m[, cluster_of(e), drop = FALSE], as.character), stringsAsFactors = FALSE)
    return(vcovCL(fit, cluster = cl, type = "HC1", cadjust = TRUE, multi0 = FALSE)[".x", ".x"])
  }
  vcovHC(fit, type = e)[".x", ".x"]
}

# --- least squares: water-survey-plan.json -----------------------------------------------------------------

fit_lm <- function(d, controls, absorb, e, weight) {
  r <- rows_of(d, controls, absorb, e, weight)
  m <- r$m
  base <- if (length(absorb) > 0) length(unique(m[[absorb]])) else 1
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, r2 = NA,
              status = "ok", zero_rows = r$zero, with_zero_rows = NA)
  if (nrow(m) <= base) {
    row$status <- "too few rows"
    return(row)
  }
  fit <- if (length(weight) > 0) {
    m$.w <- m[[weight]]
    lm(formula_of(controls, absorb), data = m, weights = .w)
  } else lm(formula_of(controls, absorb), data = m)
  row$n_params <- fit$rank
  row$estimate <- unname(coef(fit)[".x"])
  row$r2 <- summary(fit)$r.squared
  if (e == "classical") {
    row$std_error <- sqrt(vcov(fit)[".x", ".x"])
    row$df <- fit$df.residual
    return(row)
  }
  cl <- cluster_of(e)
  groups <- sapply(cl, function(c) length(unique(m[[c]])))
  row$df <- if (length(cl) > 0) min(groups) - 1 else fit$df.residual
  v <- robust(fit, e, m)
  if (!(v > 0)) {
    row$status <- "undefined: the multi-way cluster variance"
    return(row)
  }
  row$std_error <- sqrt(v)
  if (r$zero > 0 && e %in% c("HC0", "HC1")) {
    a <- r$all
    a$.w <- a[[weight]]
    left_in <- lm(formula_of(controls, absorb), data = a, weights = .w)
    row$with_zero_rows <- sqrt(vcovHC(left_in, type = e)[".x", ".x"])
  }
  row
}

outcomes <- list(list(label = "use", log = FALSE), list(label = "log use", log = TRUE))
optional <- c("household", "rooms", "urban")
samples <- list(list(label = "all", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "urban", keep = function(d) d$urban == 1))
absorbs <- list(list(label = "none", columns = character(0)), list(label = "district", columns = "district"))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "survey", column = "weight"))
errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:district", "cluster:district+wave")
rows <- list()
spec <- 0
for (o in outcomes) for (mask in 0:7) for (s in samples) for (a in absorbs) for (w in weights)
  for (e in errors) {
  x <- d_all[s$keep(d_all), ]
  x$.y <- if (o$log) log(x$use) else x$use
  x$.x <- x$garden
  controls <- subset_of(optional, mask)
  r <- fit_lm(x, controls, a$columns, e, w$column)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = o$label, garden = "garden area", controls = subset_label(controls),
                         rows = s$label, effects = a$label, weights = w$label), r)
}

write_table <- function(rows, columns, file) {
  table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
    x <- r[[c]]
    if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
  }, "")), check.names = FALSE)
  write.csv(table, file.path(out, file), row.names = FALSE, quote = TRUE)
}
write_table(rows, c("spec", "outcome", "garden", "controls", "rows", "effects", "weights", "errors", "estimate",
                    "std_error", "df", "n_obs", "n_params", "r2", "status", "zero_rows", "with_zero_rows"),
            "water-survey-expected.csv")

# --- generalized linear models with prior weights: water-logit-plan.json, water-probit-plan.json, water-poisson-plan.json

# R's glm stops on the relative deviance change; taken to 1e-14 and restarted at its estimate until the
# covariance sandwich reads is the information at the fit's own coefficients (as glm-reference.R does).
glm_weighted <- function(formula, family, m) {
  fit <- suppressWarnings(glm(formula, family = family, data = m, weights = .w,
                              control = glm.control(epsilon = 1e-14, maxit = 100)))
  for (restart in 1:20) {
    fit <- suppressWarnings(glm(formula, family = family, data = m, weights = .w, start = coef(fit),
                                control = glm.control(epsilon = 1e-14, maxit = 100)))
  }
  fit
}

# Average marginal effect of .x with prior weights: the weighted mean over the rows of mu'(eta_i) b (a
# continuous key), and its delta-method error with the specification's own covariance.
weighted_effect <- function(fit, v) {
  x <- model.matrix(fit)
  w <- fit$prior.weights / sum(fit$prior.weights)
  eta <- drop(x %*% coef(fit))
  b <- coef(fit)[[".x"]]
  fam <- fit$family
  d1 <- fam$mu.eta(eta)
  d2 <- if (fam$link == "logit") d1 * (1 - 2 * plogis(eta)) else if (fam$link == "probit") -eta * d1 else exp(eta)
  g <- colSums(w * d2 * x) * b
  g[".x"] <- g[".x"] + sum(w * d1)
  list(effect = sum(w * d1) * b, std_error = sqrt(drop(t(g) %*% v %*% g)))
}

fit_glm <- function(d, controls, e, weight, family) {
  r <- rows_of(d, controls, character(0), e, weight)
  m <- r$m
  m$.w <- if (length(weight) > 0) m[[weight]] else 1
  fit <- glm_weighted(formula_of(controls, character(0)), family, m)
  v <- if (e == "classical") vcov(fit) else if (startsWith(e, "cluster:")) {
    vcovCL(fit, cluster = as.character(m[[cluster_of(e)]]), type = "HC0", cadjust = TRUE)
  } else vcovHC(fit, type = e)
  me <- weighted_effect(fit, v)
  r2 <- if (family$family == "poisson") {
    null_fit <- glm_weighted(.y ~ 1, family, m)
    1 - as.numeric(logLik(fit)) / as.numeric(logLik(null_fit))
  } else 1 - fit$deviance / fit$null.deviance
  list(errors = e, estimate = coef(fit)[[".x"]], std_error = sqrt(v[".x", ".x"]), n_obs = nrow(m),
       n_params = fit$rank, deviance = fit$deviance, r2 = r2, effect = me$effect,
       effect_std_error = me$std_error, status = "ok")
}

glm_plan <- function(outcome, model, family, file) {
  rows <- list()
  spec <- 0
  for (mask in 0:3) for (w in weights) for (e in c("classical", "HC0", "HC1", "HC3", "cluster:district")) {
    x <- d_all
    x$.y <- x[[outcome]]
    x$.x <- x$garden
    controls <- subset_of(c("household", "rooms"), mask)
    spec <- spec + 1
    rows[[spec]] <- c(list(spec = spec, outcome = outcome, garden = "garden area", model = model,
                           controls = subset_label(controls), weights = w$label),
                      fit_glm(x, controls, e, w$column, family))
  }
  write_table(rows, c("spec", "outcome", "garden", "model", "controls", "weights", "errors", "estimate",
                      "std_error", "n_obs", "n_params", "deviance", "r2", "effect", "effect_std_error", "status"),
              file)
}
glm_plan("high", "logit", binomial(link = "logit"), "water-logit-expected.csv")
glm_plan("high", "probit", binomial(link = "probit"), "water-probit-expected.csv")
glm_plan("repairs", "poisson", poisson(link = "log"), "water-poisson-expected.csv")

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/weights-reference.R"), file.path(out, "weights-versions.txt"))
