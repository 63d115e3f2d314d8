# Times R's lm (with the sandwich package for robust errors) fitting specifications one by one on the
# benchmark's data file, for the README's comparison table. Usage, after `java -jar target/forkscape.jar bench`:
#   Rscript src/bench/r/time-lm.R target/bench
# Writes target/bench/r-lm.json. Each case fits a seeded random sample of specifications (every subset of
# the optional controls is one specification) for about five seconds and reports specifications per second.
suppressMessages(library(sandwich))
args <- commandArgs(trailingOnly = TRUE)
folder <- if (length(args) > 0) args[1] else "target/bench"
set.seed(20261201)
cases <- list()
for (n in c(1000, 100000)) {
  path <- file.path(folder, sprintf("data-%d.csv", n))
  if (!file.exists(path)) next
  d <- read.csv(path)
  d$cluster <- factor(d$cluster)
  for (k in c(10, 14)) {
    for (errors in c("classical", "HC1", "cluster")) {
      fitted <- 0
      start <- proc.time()[["elapsed"]]
      repeat {
        mask <- sample.int(2^k, 1) - 1
        bits <- which(bitwAnd(mask, 2^(0:(k - 1))) > 0)
        chosen <- if (length(bits) == 0) character(0) else paste0("c", bits)
        f <- reformulate(c(chosen, "x"), response = "y")
        m <- lm(f, data = d)
        se <- switch(errors,
          classical = sqrt(vcov(m)["x", "x"]),
          HC1 = sqrt(vcovHC(m, type = "HC1")["x", "x"]),
          cluster = sqrt(vcovCL(m, cluster = ~cluster, type = "HC1")["x", "x"]))
        fitted <- fitted + 1
        elapsed <- proc.time()[["elapsed"]] - start
        if (elapsed > 5 && fitted >= 3) break
      }
      rate <- fitted / elapsed
      name <- sprintf("n%d-k%d-%s", n, k, errors)
      cat(sprintf("%-22s R lm %10.1f spec/s (%d fitted)\n", name, rate, fitted))
      cases[[length(cases) + 1]] <- sprintf('  {"case": "%s", "r_specs_per_second": %.6g, "fitted": %d}', name, rate, fitted)
    }
  }
}
json <- paste0('{"r_version": "', R.version.string, '", "sandwich_version": "', as.character(packageVersion("sandwich")),
               '", "cases": [\n', paste(unlist(cases), collapse = ",\n"), '\n]}\n')
writeLines(json, file.path(folder, "r-lm.json"))
