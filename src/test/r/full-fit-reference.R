# Reference values for FullFitterTest: every coefficient of a few specifications, fitted by R's lm with
# standard errors from the sandwich package. Run from the project root:
#   Rscript src/test/r/full-fit-reference.R
# Written with R 4.2.2 and sandwich 3.0.2 (Debian packages r-base-core and r-cran-sandwich).
# Data: R's built-in longley (Longley 1967, JASA 62(319)) and mtcars (Henderson & Velleman 1981,
# Biometrics 37(2)) data sets, written beside the reference so the Java test reads the same numbers.
suppressMessages(library(sandwich))
out <- "src/test/resources/org/forkscape/fit"

longley_data <- longley
# a grouping for cluster-robust errors: four-year blocks of the sixteen years
longley_data$block <- (longley_data$Year - 1947) %/% 4
write.csv(longley_data, file.path(out, "longley.csv"), row.names = FALSE)

cars <- mtcars
cars$engine <- ifelse(cars$vs == 1, "straight", "V")
write.csv(cars, file.path(out, "mtcars.csv"), row.names = FALSE)

num <- function(x) sprintf("%.17g", x)
rows <- list()
add <- function(case, errors, fit, vc, df_t) {
  b <- coef(fit)
  se <- sqrt(diag(vc))
  t <- b / se
  p <- 2 * pt(-abs(t), df_t)
  s <- summary(fit)
  f <- s$fstatistic
  fp <- pf(f[1], f[2], f[3], lower.tail = FALSE)
  for (j in seq_along(b)) {
    rows[[length(rows) + 1]] <<- data.frame(case = case, errors = errors, position = j - 1, term = names(b)[j],
      estimate = num(b[j]), std_error = num(se[j]), statistic = num(t[j]), p_value = num(p[j]), df = df_t,
      n_obs = nobs(fit), n_params = length(b), r2 = num(s$r.squared), adj_r2 = num(s$adj.r.squared),
      model_f = num(f[1]), model_p_value = num(fp))
  }
}
robust <- function(case, fit, cluster) {
  add(case, "classical", fit, vcov(fit), fit$df.residual)
  for (type in c("HC0", "HC1", "HC2", "HC3")) {
    add(case, type, fit, vcovHC(fit, type = type), fit$df.residual)
  }
  # CR1: G/(G-1) (N-1)/(N-K), sandwich's vcovCL with type HC1; t reference with G - 1 degrees of freedom
  g <- length(unique(cluster))
  add(case, "cluster", fit, vcovCL(fit, cluster = cluster, type = "HC1", cadjust = TRUE), g - 1)
}

# key predictor GNP last, controls in plan order before it
fit <- lm(Employed ~ GNP.deflator + Unemployed + Armed.Forces + Population + Year + GNP, data = longley_data)
robust("longley", fit, longley_data$block)

# absorbed cylinder fixed effects are the cylinder dummies; R names them first, the test maps by role
fit <- lm(mpg ~ factor(cyl) + hp + wt, data = cars)
robust("mtcars-absorb-cyl", fit, cars$gear)

# a sample rule (automatic cars) and a categorical control (engine, reference level "V")
auto <- subset(cars, am == 0)
auto$engine <- factor(auto$engine, levels = c("V", "straight"))
fit <- lm(mpg ~ qsec + engine + drat, data = auto)
robust("mtcars-automatic", fit, auto$gear)

write.csv(do.call(rbind, rows), file.path(out, "full-fit-reference.csv"), row.names = FALSE)
