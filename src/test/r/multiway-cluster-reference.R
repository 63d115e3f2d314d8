# Reference values for Forkscape's multi-way cluster-robust standard errors, computed with R's lm and
# sandwich::vcovCL (Zeileis, Koell & Graham 2020, "Various versatile variances: an object-oriented
# implementation of clustered covariances in R", Journal of Statistical Software 95(1)), whose multi-way
# form is that of Cameron, Gelbach & Miller 2011, "Robust inference with multiway clustering", Journal of
# Business & Economic Statistics 29(2).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/multiway-cluster-reference.R
#
# It writes, under src/test/resources/reference/:
#   plot-panel.csv                 an invented, unbalanced panel of field plots over seasons, generated
#                                  here with a fixed seed (below), and a block of four rows built so that
#                                  the two-way variance is not positive
#   plot-panel-expected.csv        per specification of plot-panel-plan.json (written by hand): the key
#                                  estimate, its standard error, df, rows, coefficients and status
#   multiway-versions.txt          the R and sandwich versions that produced both
#
# The plan is not parsed: its multiverse is written out below with loops, in the plan's decision order
# with the last decision varying fastest, so the spec numbers are Forkscape's (1-based).

suppressPackageStartupMessages(library(sandwich))

out <- file.path("src", "test", "resources", "reference")
if (!dir.exists(out)) {
  stop("run this script from the repository root (", out, " not found)")
}
num <- function(x) ifelse(is.finite(x), sprintf("%.17g", x), "")

# --- data: 24 plots over 8 seasons, about 15% of plot-seasons not observed -------------------------------

set.seed(20261202)
plots <- sprintf("P%02d", 1:24)
panel <- expand.grid(season = 1:8, plot = plots, stringsAsFactors = FALSE)[, c("plot", "season")]
panel <- panel[runif(nrow(panel)) > 0.15, ]
n <- nrow(panel)
plot_effect <- rnorm(24)[match(panel$plot, plots)]
season_effect <- rnorm(8)[panel$season]
panel$observer <- sprintf("O%d", sample(1:5, n, replace = TRUE))
panel$area <- round(runif(24, 0.5, 3), 2)[match(panel$plot, plots)]
panel$soil <- round(rnorm(n) + 0.5 * plot_effect, 3)
panel$slope <- round(runif(n, 0, 12), 2)
panel$rainfall <- round(60 + 8 * season_effect + 5 * plot_effect + rnorm(n, sd = 6), 2)
panel$yield <- round(30 + 0.08 * panel$rainfall + 0.6 * panel$soil - 0.05 * panel$slope + 2 * plot_effect
                     + 2 * season_effect + rnorm(n, sd = 1 + 0.4 * abs(plot_effect)), 3)
panel$soil[runif(n) < 0.06] <- NA
panel$block <- 1

# Four rows where rainfall varies by plot and the residual by season: every row's score e_i u_i has the
# sign of a checkerboard over (plot, season), so each plot's and each season's scores sum to nearly zero
# while the rows' do not, and V_plot + V_season - V_intersection < 0.
tiny <- data.frame(plot = c("Q1", "Q1", "Q2", "Q2"), season = c(1, 2, 1, 2), observer = "O1",
                   area = c(1.5, 1.5, 2.5, 2.5), soil = NA, slope = NA,
                   rainfall = c(70, 70, 50, 50), block = 2)
tiny$yield <- 20 + 0.1 * tiny$rainfall + c(1, -1, 1, -1) + c(0.01, -0.02, 0.015, 0.005)
d_all <- rbind(panel, tiny[, names(panel)])
path <- file.path(out, "plot-panel.csv")
write.csv(d_all, path, row.names = FALSE, na = "", quote = FALSE)
d_all <- read.csv(path, na.strings = "", check.names = FALSE, stringsAsFactors = FALSE)

# --- one specification ------------------------------------------------------------------------------------

# Fits .y on the controls, the absorbed plot dummies and .x, on the rows complete on every variable the
# specification uses (its cluster columns too), as Forkscape's statuses order the checks.
fit_one <- function(d, controls, absorb, e) {
  cluster <- if (startsWith(e, "cluster:")) strsplit(sub("cluster:", "", e, fixed = TRUE), "+", fixed = TRUE)[[1]]
             else character(0)
  used <- unique(c(".y", ".x", controls, absorb, cluster))
  m <- na.omit(d[, used, drop = FALSE])
  base <- if (length(absorb) > 0) length(unique(m[[absorb]])) else 1
  row <- list(errors = e, estimate = NA, std_error = NA, df = NA, n_obs = nrow(m), n_params = NA, status = "ok")
  if (nrow(m) <= base) {
    row$status <- "too few rows"
    return(row)
  }
  if (length(absorb) > 0) m[[absorb]] <- factor(m[[absorb]])
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
  if (e == "classical") {
    row$std_error <- sqrt(vcov(fit)[".x", ".x"])
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

# --- plan plot-panel-plan.json ------------------------------------------------------------------------------

subset_label <- function(included) if (length(included) == 0) "none" else paste(included, collapse = " + ")
subset_of <- function(optional, mask) optional[bitwAnd(mask, 2^(seq_along(optional) - 1)) > 0]

outcomes <- list(list(label = "yield", log = FALSE), list(label = "log yield", log = TRUE))
optional <- c("soil", "slope", "area")
samples <- list(list(label = "all plots", keep = function(d) rep(TRUE, nrow(d))),
                list(label = "panel", keep = function(d) d$block == 1),
                list(label = "four rows", keep = function(d) d$block == 2))
absorbs <- list(list(label = "none", columns = character(0)), list(label = "plot", columns = "plot"))
errors <- c("classical", "cluster:plot+season", "cluster:season+observer", "cluster:plot+season+observer")
rows <- list()
spec <- 0
for (o in outcomes) for (mask in 0:7) for (s in samples) for (a in absorbs) for (e in errors) {
  d <- d_all[s$keep(d_all), ]
  d$.y <- if (o$log) log(d$yield) else d$yield
  d$.x <- d$rainfall
  controls <- subset_of(optional, mask)
  r <- fit_one(d, controls, a$columns, e)
  spec <- spec + 1
  rows[[spec]] <- c(list(spec = spec, outcome = o$label, rain = "rainfall", controls = subset_label(controls),
                         rows = s$label, effects = a$label), r)
}
columns <- c("spec", "outcome", "rain", "controls", "rows", "effects", "errors", "estimate", "std_error", "df",
             "n_obs", "n_params", "status")
table <- data.frame(lapply(setNames(columns, columns), function(c) vapply(rows, function(r) {
  x <- r[[c]]
  if (is.numeric(x) || (length(x) == 1 && is.na(x))) num(as.numeric(x)) else as.character(x)
}, "")), check.names = FALSE)
write.csv(table, file.path(out, "plot-panel-expected.csv"), row.names = FALSE, quote = TRUE)

writeLines(c(paste("R:", R.version.string), paste("sandwich:", packageVersion("sandwich")),
             "script: src/test/r/multiway-cluster-reference.R"), file.path(out, "multiway-versions.txt"))
