# Reference values for Forkscape's multi-way cluster-robust standard errors of generalized linear models,
# computed with R's glm and sandwich::vcovCL (Zeileis, Koell & Graham 2020, "Various versatile variances: an
# object-oriented implementation of clustered covariances in R", Journal of Statistical Software 95(1)),
# whose multi-way form is that of Cameron, Gelbach & Miller 2011, "Robust inference with multiway
# clustering", Journal of Business & Economic Statistics 29(2).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/multiway-glm-reference.R
#
# It writes, under src/test/resources/reference/:
#   tutoring-panel.csv             an invented panel of pupils in 14 schools over 6 terms, each pupil-term
#                                  with one of 7 tutors (crossed with both), generated here with a fixed
#                                  seed (below): a 0/1 outcome (passed), a count outcome (absences), prior
#                                  weights with zeros and missing cells, a control with missing cells
#   tutoring-logit-expected.csv    per specification of tutoring-logit-plan.json, tutoring-probit-plan.json
#   tutoring-probit-expected.csv   and tutoring-poisson-plan.json (written by hand): the key estimate, its
#   tutoring-poisson-expected.csv  standard error and normal p-value, rows, coefficients, the average
#                                  marginal effect and its delta-method error, the status, and for multi-way
#                                  errors one_way_std_error (vcovCL on the first column alone) and
#                                  hc0_std_error (the same multi-way sum with type = "HC0", which leaves out
#                                  (n - 1)/(n - K)), for the test to show that neither is what it computes
#   multiway-glm-versions.txt      the R and sandwich versions that produced them
#
# Multi-way errors are vcovCL(fit, cluster = ~ a + b, type = "HC1", cadjust = TRUE, multi0 = FALSE): each
# intersection's cluster sum times its own G/(G - 1), added with the sign (-1)^(|S|+1), and the whole times
# (n - 1)/(n - K), K the glm's coefficients (fixed-effect dummies included); sandwich 3.0.2's meatCL applies
# that HC1 factor to every model, glm included. One-way cluster errors of a glm keep vcovCL's glm default
# (type HC0: G/(G - 1) alone), as weights-reference.R and glm-reference.R do.
#
# The plans are not parsed: their multiverses are written out below with loops, in each plan's decision
# order with the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: 14 schools x 6 terms, 9 pupil records each, about 10% not recorded ------------------------------

set.seed(20261204)
schools <- sprintf("S%02d", 1:14)
d <- expand.grid(k = 1:9, term = 1:6, school = schools, stringsAsFactors = FALSE)
d <- d[runif(nrow(d)) > 0.1, c("school", "term")]
n <- nrow(d)
school_effect <- rnorm(14, sd = 0.6)[match(d$school, schools)]
term_effect <- rnorm(6, sd = 0.5)[d$term]
d$tutor <- sprintf("T%d", sample(1:7, n, replace = TRUE))
tutor_effect <- rnorm(7, sd = 0.4)[as.integer(sub("T", "", d$tutor))]
d$hours <- round(pmax(0, rnorm(n, 6, 2.5) + 1.5 * school_effect + term_effect), 1)
d$distance <- round(runif(14, 0.5, 9)[match(d$school, schools)] + runif(n, 0, 2), 2)
d$class_size <- sample(18:32, n, replace = TRUE)
shared <- school_effect + term_effect + tutor_effect
d$passed <- as.integer(runif(n) < plogis(-1.2 + 0.18 * d$hours - 0.05 * d$distance + shared))
d$absences <- rpois(n, exp(1.1 - 0.06 * d$hours + 0.02 * d$class_size + 0.8 * shared))
d$weight <- round(runif(n, 0.4, 2.5), 3)
d$weight[runif(n) < 0.05] <- 0
d$weight[runif(n) < 0.04] <- NA
d$distance[runif(n) < 0.05] <- NA
path <- file.path(out, "tutoring-panel.csv")
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
  variance <- drop(t(g) %*% v %*% g)
  list(effect = sum(w * d1) * b, std_error = if (variance > 0) sqrt(variance) else NA)
}

clusters_of <- function(m, columns) {
  as.data.frame(lapply(m[, columns, drop = FALSE], as.character), stringsAsFactors = FALSE)
}

# The rows of one specification: the sample rule, then complete on every variable it uses (weight and
# cluster columns too), then, when weighted, the positive-weight rows alone (weights-reference.R says why).
fit_glm <- function(d, controls, absorb, e, weight, family) {
  used <- unique(c(".y", ".x", controls, absorb, cluster_of(e), weight))
  m <- na.omit(d[, used, drop = FALSE])
  if (length(weight) > 0) m <- m[m[[weight]] > 0, , drop = FALSE]
  m$.w <- if (length(weight) > 0) m[[weight]] else 1
  terms <- c(sprintf("`%s`", controls), if (length(absorb) > 0) sprintf("factor(`%s`)", absorb), ".x")
  fit <- glm_weighted(reformulate(terms, response = ".y"), family, m)
  row <- list(errors = e, estimate = coef(fit)[[".x"]], n_obs = nrow(m), n_params = fit$rank, status = "ok")
  columns <- cluster_of(e)
  v <- if (length(columns) > 1) {
    row$one_way_std_error <- sqrt(vcovCL(fit, cluster = clusters_of(m, columns[1]), type = "HC0",
                                         cadjust = TRUE)[".x", ".x"])
    hc0 <- vcovCL(fit, cluster = clusters_of(m, columns), type = "HC0", cadjust = TRUE, multi0 = FALSE)
    row$hc0_std_error <- if (hc0[".x", ".x"] > 0) sqrt(hc0[".x", ".x"]) else NA
    vcovCL(fit, cluster = clusters_of(m, columns), type = "HC1", cadjust = TRUE, multi0 = FALSE)
  } else if (length(columns) == 1) {
    vcovCL(fit, cluster = clusters_of(m, columns), type = "HC0", cadjust = TRUE)
  } else vcovHC(fit, type = e)
  if (!(v[".x", ".x"] > 0)) {
    row$status <- "undefined: the multi-way cluster variance"
    return(row)
  }
  row$std_error <- sqrt(v[".x", ".x"])
  row$p_value <- 2 * pnorm(-abs(row$estimate / row$std_error))
  me <- weighted_effect(fit, v)
  row$effect <- me$effect
  row$effect_std_error <- me$std_error
  row
}

samples <- list(list(label = "all terms", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "first two terms", keep = function(d) d$term <= 2))
absorbs <- list(list(label = "none", columns = character(0)), list(label = "term effects", columns = "term"))
weights <- list(list(label = "unweighted", column = character(0)), list(label = "prior", column = "weight"))
errors <- c("HC1", "cluster:school", "cluster:school+term", "cluster:school+term+tutor")

glm_plan <- function(outcome, model, family, file) {
  rows <- list()
  spec <- 0
  for (s in samples) for (a in absorbs) for (mask in 0:3) for (w in weights) for (e in errors) {
    x <- d_all[s$keep(d_all), ]
    x$.y <- x[[outcome]]
    x$.x <- x$hours
    controls <- subset_of(c("distance", "class_size"), mask)
    spec <- spec + 1
    rows[[spec]] <- c(list(spec = spec, outcome = outcome, hours = "tutoring hours", model = model,
                           rows = s$label, effects = a$label, controls = subset_label(controls),
                           weights = w$label),
                      fit_glm(x, controls, a$columns, e, w$column, family))
  }
  write_table(rows, c("spec", "outcome", "hours", "model", "rows", "effects", "controls", "weights", "errors",
                      "estimate", "std_error", "p_value", "n_obs", "n_params", "effect", "effect_std_error",
                      "status", "one_way_std_error", "hc0_std_error"), file)
}
glm_plan("passed", "logit", binomial(link = "logit"), "tutoring-logit-expected.csv")
glm_plan("passed", "probit", binomial(link = "probit"), "tutoring-probit-expected.csv")
glm_plan("absences", "poisson", poisson(link = "log"), "tutoring-poisson-expected.csv")

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/multiway-glm-reference.R"), file.path(out, "multiway-glm-versions.txt"))
