# Reference values for the benchmark's per-specification logit baseline (org.forkscape.bench.GlmBaseline),
# computed with R's glm (binomial family, logit link) and sandwich::vcovHC(type = "HC1") (Zeileis 2006,
# "Object-oriented computation of sandwich estimators", Journal of Statistical Software 16(9)).
#
# Run from the repository root, with Debian's r-base-core and r-cran-sandwich installed:
#
#     Rscript src/test/r/glm-baseline-reference.R
#
# It reads src/test/resources/reference/glm-baseline-data.csv (400 rows written by the benchmark's data
# generator; GlmBaselineTest checks that the committed file is the generator's output) and writes, in the
# same folder:
#   glm-baseline-expected.csv   for every subset of the first six controls (mask bit j = control j + 1 is
#                               in), the key coefficient, its HC1 standard error and glm's iteration count
#   glm-baseline-versions.txt   the R and sandwich versions that produced it

suppressPackageStartupMessages(library(sandwich))

folder <- file.path("src", "test", "resources", "reference")
if (!dir.exists(folder)) {
  stop("run this script from the repository root (", folder, " not found)")
}
d <- read.csv(file.path(folder, "glm-baseline-data.csv"))
controls <- names(d)[3:8]

num <- function(x) sprintf("%.17g", x)
rows <- character(0)
for (mask in 0:(2^length(controls) - 1)) {
  chosen <- controls[bitwAnd(mask, 2^(seq_along(controls) - 1)) > 0]
  m <- glm(reformulate(c(chosen, "outreach"), response = "signed_up"), family = binomial(), data = d,
           control = glm.control(epsilon = 1e-10))
  se <- sqrt(vcovHC(m, type = "HC1")["outreach", "outreach"])
  rows <- c(rows, paste(mask, num(coef(m)[["outreach"]]), num(se), m$iter, sep = ","))
}
writeLines(c("mask,estimate,std_error,iterations", rows), file.path(folder, "glm-baseline-expected.csv"))
writeLines(c(paste("R:", R.version.string), paste("sandwich:", as.character(packageVersion("sandwich"))),
             "script: src/test/r/glm-baseline-reference.R"), file.path(folder, "glm-baseline-versions.txt"))
