# Writes the simulated data set of the influence cross-check (org.forkscape.infer.InfluenceAgainstRTest).
# Usage: Rscript influence-data.R OUT.csv   (see influence-reference.sh for the whole procedure)
args <- commandArgs(trailingOnly = TRUE)
set.seed(20240611)
n <- 240
a <- rnorm(n)
b <- rnorm(n)
c <- rnorm(n)
s <- runif(n)
x <- rnorm(n) + 0.5 * a
y <- 0.15 * x + 0.6 * a - 0.4 * b + rnorm(n)
y2 <- 0.10 * x + 0.3 * c + rnorm(n)
d <- data.frame(y = y, y2 = y2, x = x, xb = as.numeric(x > 0), a = a, b = b, c = c, s = s)
write.csv(d, args[1], row.names = FALSE)
