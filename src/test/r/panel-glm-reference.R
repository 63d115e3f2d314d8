# Reference values for Forkscape's logit, probit and Poisson models beside two and three absorbed fixed-effect
# columns, computed with R's glm with a factor() term for every absorbed column, sandwich::vcovHC and
# sandwich::vcovCL (Zeileis 2006, Journal of Statistical Software 16(9); Zeileis, Koell & Graham 2020,
# Journal of Statistical Software 95(1)), and the average marginal effects by their formula.
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/panel-glm-reference.R
#
# It writes, under src/test/resources/reference/:
#   reading-panel.csv              an invented, unbalanced panel generated here with a fixed seed (below):
#                                  pupils' records in 16 classrooms over terms, in two schools that share no
#                                  classroom, term or tutor (two connected components), several records per
#                                  classroom and term, each with one of the school's tutors (crossed with
#                                  both); a 0/1 outcome (passed), a count outcome (absences), a continuous
#                                  key predictor (hours), a 0/1 key predictor (tutored), a control constant
#                                  within classrooms (building_age, which the effects span), a control with
#                                  missing cells (distance), prior weights with zeros and missing cells
#   reading-logit-expected.csv     per specification of reading-logit-plan.json, reading-probit-plan.json and
#   reading-probit-expected.csv    reading-poisson-plan.json (written by hand): the key estimate, its
#   reading-poisson-expected.csv   standard error and normal p-value, rows, fit$rank, the average marginal
#                                  effect and its delta-method error, the deviance, McFadden's R-squared,
#                                  the likelihood-ratio test's p-value against the model with the fixed
#                                  effects alone, and the status
#   panel-glm-versions.txt         the R and sandwich versions that produced them
#
# Errors as README states them for a glm: classical = vcov(fit); HC0-HC3 = vcovHC(fit, type = ...), HC2
# and HC3 with the working-weighted hat values of the design with every set of dummies (hatvalues);
# cluster:a = vcovCL(fit, cluster = ~ a, type = "HC0", cadjust = TRUE) (vcovCL's glm default);
# cluster:a+b = vcovCL(fit, cluster = ~ a + b, type = "HC1", cadjust = TRUE, multi0 = FALSE).
# The plans are not parsed: their multiverses are written out below with loops, in each plan's decision
# order with the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: two schools, 8 classrooms each, 5 terms each, about 6 records per classroom and term ----------

set.seed(20261205)
d <- do.call(rbind, lapply(1:2, function(s) {
  g <- expand.grid(k = 1:6, term = (s - 1) * 5 + 1:5, classroom = (s - 1) * 8 + 1:8)
  g$school <- s
  g
}))
d <- d[runif(nrow(d)) > 0.12, ]
n <- nrow(d)
d$classroom <- sprintf("C%02d", d$classroom)
d$tutor <- sprintf("T%d", (d$school - 1) * 4 + sample(1:4, n, replace = TRUE))
room_effect <- rnorm(16, sd = 0.5)[as.integer(sub("C", "", d$classroom))]
term_effect <- rnorm(10, sd = 0.4)[d$term]
tutor_effect <- rnorm(8, sd = 0.3)[as.integer(sub("T", "", d$tutor))]
d$building_age <- round(runif(16, 5, 60))[as.integer(sub("C", "", d$classroom))]
d$hours <- round(pmax(0, rnorm(n, 5, 2) + room_effect + term_effect), 1)
d$tutored <- as.integer(runif(n) < plogis(0.8 * room_effect))
d$distance <- round(runif(n, 0.3, 8), 2)
d$distance[runif(n) < 0.06] <- NA
shared <- room_effect + term_effect + tutor_effect
d$passed <- as.integer(runif(n) < plogis(-0.9 + 0.15 * d$hours + 0.4 * d$tutored - 0.04 * d$distance + shared))
d$passed[is.na(d$passed)] <- as.integer(runif(sum(is.na(d$passed))) < 0.5)
d$absences <- rpois(n, exp(0.9 - 0.05 * d$hours - 0.2 * d$tutored + 0.7 * shared))
d$weight <- round(runif(n, 0.3, 2.5), 3)
d$weight[runif(n) < 0.05] <- 0
d$weight[runif(n) < 0.04] <- NA
d <- d[, c("school", "classroom", "term", "tutor", "building_age", "hours", "tutored", "distance", "passed",
           "absences", "weight")]
path <- file.path(out, "reading-panel.csv")
write.csv(d, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]
cluster_of <- function(e) if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+",
                                                              fixed = TRUE)[[1]] else character(0)

write_table <- function(rows, columns, file) {
  table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
    x <- r[[c]]
    if (is.null(x)) "" else if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x))
    else as.character(x)
  }, "")), check.names = FALSE)
  write.csv(table, file.path(out, file), row.names = FALSE, quote = TRUE)
}

# R's glm stops on the relative deviance change; taken to 1e-14 and restarted at its estimate until the
# covariance sandwich reads is the information at the fit's own coefficients (as glm-reference.R does).
glm_weighted <- function(formula, family, m) {
  fit <- suppressWarnings(glm(formula, family = family, data = m, weights = .w,
                              control = glm.control(epsilon = 1e-14, maxit = 100)))
  for (restart in 1:20) {
    start <- coef(fit)
    start[is.na(start)] <- 0
    fit <- suppressWarnings(glm(formula, family = family, data = m, weights = .w, start = start,
                                control = glm.control(epsilon = 1e-14, maxit = 100)))
  }
  fit
}

# glm's own test of aliased columns uses the tolerance min(1e-7, epsilon / 1000), 1e-17 at the epsilon used
# here, which keeps the dummy that two disconnected groups make redundant and leaves a singular fit; so the
# model matrix's independent columns are chosen first by qr() at lm's tolerance 1e-7, and the glm is fitted
# on them (the same model: the column space, fit$rank, the key coefficient and every fitted value). Returns
# the formula on those columns (v1, v2, ... and .x) and the rows holding them.
independent <- function(formula, m) {
  x <- model.matrix(formula, m)
  q <- qr(x, tol = 1e-7)
  keep <- sort(q$pivot[seq_len(q$rank)])
  names <- ifelse(colnames(x)[keep] == ".x", ".x", paste0("v", keep))
  data <- data.frame(x[, keep, drop = FALSE], check.names = FALSE)
  names(data) <- names
  data$.y <- m$.y
  data$.w <- m$.w
  list(formula = reformulate(sprintf("`%s`", names), response = ".y", intercept = FALSE), data = data)
}

# Average marginal effect of .x with prior weights, by formula over the non-aliased columns: for a 0/1 key
# the weighted mean of mu(eta at x = 1) - mu(eta at x = 0), else of mu'(eta) b; its delta-method error
# g'Vg with the specification's own covariance V.
weighted_effect <- function(fit, v, binary) {
  keep <- !is.na(coef(fit))
  x <- model.matrix(fit)[, keep, drop = FALSE]
  b <- coef(fit)[keep]
  w <- fit$prior.weights / sum(fit$prior.weights)
  fam <- fit$family
  if (binary) {
    x1 <- x
    x1[, ".x"] <- 1
    x0 <- x
    x0[, ".x"] <- 0
    eta1 <- drop(x1 %*% b)
    eta0 <- drop(x0 %*% b)
    effect <- sum(w * (fam$linkinv(eta1) - fam$linkinv(eta0)))
    g <- colSums(w * (fam$mu.eta(eta1) * x1 - fam$mu.eta(eta0) * x0))
  } else {
    eta <- drop(x %*% b)
    d1 <- fam$mu.eta(eta)
    d2 <- if (fam$link == "logit") d1 * (1 - 2 * plogis(eta)) else if (fam$link == "probit") -eta * d1 else exp(eta)
    g <- colSums(w * d2 * x) * b[[".x"]]
    g[".x"] <- g[".x"] + sum(w * d1)
    effect <- sum(w * d1) * b[[".x"]]
  }
  g <- g[colnames(v)]
  variance <- drop(t(g) %*% v %*% g)
  list(effect = effect, std_error = if (variance > 0) sqrt(variance) else NA)
}

clusters_of <- function(m, columns) {
  as.data.frame(lapply(m[, columns, drop = FALSE], as.character), stringsAsFactors = FALSE)
}

separated <- function(fit, family) {
  mu <- fitted(fit)
  if (family$family == "poisson") any(mu < 1e-10 & fit$y == 0) else any(mu < 1e-10 | mu > 1 - 1e-10)
}

# The rows of one specification: complete on every variable it uses (weight and cluster columns too), then,
# when weighted, the positive-weight rows alone (weights-reference.R says why).
fit_glm <- function(d, controls, absorb, e, weight, family, binary) {
  used <- unique(c(".y", ".x", controls, absorb, cluster_of(e), weight))
  m <- na.omit(d[, used, drop = FALSE])
  if (length(weight) > 0) m <- m[m[[weight]] > 0, , drop = FALSE]
  m$.w <- if (length(weight) > 0) m[[weight]] else 1
  effects <- sprintf("factor(`%s`)", absorb)
  terms <- c(sprintf("`%s`", controls), effects, ".x")
  full <- independent(reformulate(terms, response = ".y"), m)
  fit <- glm_weighted(full$formula, family, full$data)
  alone <- independent(reformulate(effects, response = ".y"), m)
  none <- glm_weighted(alone$formula, family, alone$data)
  row <- list(errors = e, estimate = coef(fit)[[".x"]], n_obs = nrow(m), n_params = fit$rank, status = "ok")
  if (separated(fit, family)) {
    row$status <- "separation"
    return(row)
  }
  columns <- cluster_of(e)
  v <- if (length(columns) > 1) {
    vcovCL(fit, cluster = clusters_of(m, columns), type = "HC1", cadjust = TRUE, multi0 = FALSE)
  } else if (length(columns) == 1) {
    vcovCL(fit, cluster = clusters_of(m, columns), type = "HC0", cadjust = TRUE)
  } else if (e == "classical") vcov(fit) else vcovHC(fit, type = e)
  row$deviance <- deviance(fit)
  ll <- if (family$family == "poisson") c(logLik(fit), logLik(none)) else -c(deviance(fit), deviance(none)) / 2
  row$r2 <- 1 - ll[1] / ll[2]
  row$model_p_value <- pchisq(deviance(none) - deviance(fit), fit$rank - none$rank, lower.tail = FALSE)
  if (!(v[".x", ".x"] > 0)) {
    row$status <- "undefined: the multi-way cluster variance"
    return(row)
  }
  row$std_error <- sqrt(v[".x", ".x"])
  row$p_value <- 2 * pnorm(-abs(row$estimate / row$std_error))
  me <- weighted_effect(fit, v, binary)
  row$effect <- me$effect
  row$effect_std_error <- me$std_error
  row
}

predictors <- list(list(label = "hours", column = "hours", binary = FALSE),
                   list(label = "tutored", column = "tutored", binary = TRUE))
absorbs <- list(list(label = "classroom and term", columns = c("classroom", "term")),
                list(label = "classroom, term and tutor", columns = c("classroom", "term", "tutor")))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "prior", column = "weight"))
errors <- c("classical", "HC0", "HC1", "HC2", "HC3", "cluster:classroom", "cluster:classroom+term")

glm_plan <- function(outcome, model, family, file) {
  rows <- list()
  spec <- 0
  for (x in predictors) for (a in absorbs) for (mask in 0:3) for (w in weights) for (e in errors) {
    data <- d_all
    data$.y <- data[[outcome]]
    data$.x <- data[[x$column]]
    controls <- subset_of(c("building_age", "distance"), mask)
    spec <- spec + 1
    rows[[spec]] <- c(list(spec = spec, outcome = outcome, key = x$label, model = model,
                           effects = a$label, controls = subset_label(controls), weights = w$label),
                      fit_glm(data, controls, a$columns, e, w$column, family, x$binary))
  }
  write_table(rows, c("spec", "outcome", "key", "model", "effects", "controls", "weights", "errors",
                      "estimate", "std_error", "p_value", "n_obs", "n_params", "effect", "effect_std_error",
                      "deviance", "r2", "model_p_value", "status"), file)
}
glm_plan("passed", "logit", binomial(link = "logit"), "reading-logit-expected.csv")
glm_plan("passed", "probit", binomial(link = "probit"), "reading-probit-expected.csv")
glm_plan("absences", "poisson", poisson(link = "log"), "reading-poisson-expected.csv")

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/panel-glm-reference.R"), file.path(out, "panel-glm-versions.txt"))
