# Times R's lm with explicit fixed-effect dummies and analytic weights, and sandwich's standard errors, on a
# slice of the panel benchmark, for the benchmark command, which runs it when Rscript is on the PATH:
#   Rscript time-panel-lm.R DATA.csv MASKS.txt SECONDS OUT.csv
# DATA.csv: y, x, c1..c10, w, unit, period. MASKS.txt: the control subsets to fit, one mask a line (bit j =
# control c(j+1)). For each mask: lm(y ~ controls + x + factor(unit) + factor(period), weights = w) once,
# then the key's classical, HC1 (vcovHC), one-way (vcovCL by unit) and two-way (vcovCL by unit + period)
# standard errors, each timed; the engine counts these as four specifications, so R's time for one is the
# lm's plus its own error's. Stops after SECONDS of R time once three masks are done.
# Exit status 3: the sandwich package is not installed.
if (!requireNamespace("sandwich", quietly = TRUE)) {
  cat("the R package sandwich is not installed\n", file = stderr())
  quit(status = 3)
}
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
d$unit <- factor(d$unit)
d$period <- factor(d$period)
masks <- as.numeric(readLines(args[2]))
budget <- as.numeric(args[3])
controls <- paste0("c", 1:10)
lines <- character(0)
spent <- 0
elapsed <- function() proc.time()[["elapsed"]]
for (mask in masks) {
  bits <- bitwAnd(mask, 2^(seq_along(controls) - 1)) > 0
  t0 <- elapsed()
  m <- lm(reformulate(c(controls[bits], "x", "factor(unit)", "factor(period)"), response = "y"), data = d,
          weights = w)
  t1 <- elapsed()
  classical <- sqrt(vcov(m)["x", "x"])
  t2 <- elapsed()
  hc1 <- sqrt(sandwich::vcovHC(m, type = "HC1")["x", "x"])
  t3 <- elapsed()
  one <- sqrt(sandwich::vcovCL(m, cluster = ~ unit, type = "HC1", cadjust = TRUE)["x", "x"])
  t4 <- elapsed()
  two <- sqrt(sandwich::vcovCL(m, cluster = ~ unit + period, type = "HC1", cadjust = TRUE, multi0 = FALSE)["x", "x"])
  t5 <- elapsed()
  lines <- c(lines, paste(mask, sprintf("%.17g", coef(m)[["x"]]), sprintf("%.17g", classical), sprintf("%.17g", hc1),
                          sprintf("%.17g", one), sprintf("%.17g", two), sprintf("%.6f", t1 - t0),
                          sprintf("%.6f", t2 - t1), sprintf("%.6f", t3 - t2), sprintf("%.6f", t4 - t3),
                          sprintf("%.6f", t5 - t4), sep = ","))
  spent <- spent + (t5 - t0)
  if (spent > budget && length(lines) >= 3) break
}
writeLines(c(paste0("# ", R.version.string, ", sandwich ", as.character(packageVersion("sandwich"))),
             "mask,estimate,classical,hc1,cluster_unit,cluster_two_way,lm_seconds,classical_seconds,hc1_seconds,cluster_unit_seconds,cluster_two_way_seconds",
             lines), args[4])
