# Times R's glm (binomial family, logit link) with sandwich::vcovHC(type = "HC1") fitting specifications
# one by one, for the benchmark command, which runs it when Rscript is on the PATH:
#   Rscript time-glm.R DATA.csv MASKS.txt SECONDS OUT.csv
# DATA.csv: outcome first, key predictor second, then the optional controls (mask bit j = column j + 3).
# MASKS.txt: the specifications to fit, one control mask a line, in order. Each specification is fitted
# twice: by glm with vcovHC, as a user would, and by glm.fit alone on its columns of a model matrix built
# once; both with the engine's convergence criterion, epsilon = 1e-10. It stops after SECONDS of glm
# time once three are done and writes one line per fitted specification to OUT.csv.
# Exit status 3: the sandwich package is not installed.
if (!requireNamespace("sandwich", quietly = TRUE)) {
  cat("the R package sandwich is not installed\n", file = stderr())
  quit(status = 3)
}
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
masks <- as.numeric(readLines(args[2]))
budget <- as.numeric(args[3])
outcome <- names(d)[1]
key <- names(d)[2]
controls <- names(d)[-(1:2)]
full <- cbind(1, as.matrix(d[, controls]), d[[key]])
y <- d[[outcome]]
control <- glm.control(epsilon = 1e-10)
lines <- character(0)
spent <- 0
for (mask in masks) {
  bits <- bitwAnd(mask, 2^(seq_along(controls) - 1)) > 0
  start <- proc.time()[["elapsed"]]
  m <- glm(reformulate(c(controls[bits], key), response = outcome), family = binomial(), data = d,
           control = control)
  se <- sqrt(sandwich::vcovHC(m, type = "HC1")[key, key])
  glm_seconds <- proc.time()[["elapsed"]] - start
  start <- proc.time()[["elapsed"]]
  f <- glm.fit(full[, c(TRUE, bits, TRUE), drop = FALSE], y, family = binomial(), control = control)
  fit_seconds <- proc.time()[["elapsed"]] - start
  lines <- c(lines, paste(mask, sprintf("%.17g", coef(m)[[key]]), sprintf("%.17g", se), m$iter,
                          sprintf("%.6f", glm_seconds), sprintf("%.6f", fit_seconds), sep = ","))
  spent <- spent + glm_seconds
  if (spent > budget && length(lines) >= 3) break
}
writeLines(c(paste0("# ", R.version.string, ", sandwich ", as.character(packageVersion("sandwich"))),
             "mask,estimate,std_error,iterations,glm_seconds,glm_fit_seconds", lines), args[4])
