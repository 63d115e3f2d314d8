# Reference values for the influence analysis, computed by R from a specifications.csv that Forkscape
# wrote (org.forkscape.infer.InfluenceAgainstRTest compares its own numbers with them).
# Per factor (each decision; one in/out factor per optional control of the all-subsets controls
# decision): mean estimate, count and share significant in the dominant sign per level, and the
# variance share = the factor's sum of squares in a one-way aov of the estimates / total sum of squares.
# The interactions share is the residual sum of squares of the main-effects aov over the total.
# Usage: Rscript influence-aov.R SPECIFICATIONS.csv OUT.csv
args <- commandArgs(trailingOnly = TRUE)
specs <- read.csv(args[1], stringsAsFactors = FALSE, check.names = FALSE)
ok <- specs[grepl("^ok", specs$status), ]
optional <- c("a", "b", "c")
chosen <- strsplit(ok$controls, " + ", fixed = TRUE)
for (v in optional) {
  ok[[v]] <- factor(ifelse(sapply(chosen, function(p) v %in% p), "in", "out"), levels = c("in", "out"))
}
factors <- c("outcome", "key", optional, "rows", "errors")
alpha <- 0.05
dominant <- if (median(ok$estimate) >= 0) 1 else -1
significant <- ok$p_value < alpha & sign(ok$estimate) == dominant
total <- sum((ok$estimate - mean(ok$estimate))^2)
out <- data.frame()
for (f in factors) {
  g <- factor(ok[[f]])
  share <- summary(aov(ok$estimate ~ g))[[1]][["Sum Sq"]][1] / total
  for (l in levels(g)) {
    at <- g == l
    out <- rbind(out, data.frame(factor = f, level = l, mean_estimate = sprintf("%.17g", mean(ok$estimate[at])),
                                 specifications = sum(at), share_significant = sprintf("%.17g", mean(significant[at])),
                                 variance_share = sprintf("%.17g", share)))
  }
}
main <- aov(as.formula(paste("estimate ~", paste(sprintf("`%s`", factors), collapse = " + "))), data = ok)
residual <- tail(summary(main)[[1]][["Sum Sq"]], 1) / total
out <- rbind(out, data.frame(factor = "(interactions)", level = "", mean_estimate = "", specifications = nrow(ok),
                             share_significant = sprintf("%.17g", mean(significant)),
                             variance_share = sprintf("%.17g", residual)))
con <- file(args[2], "w")
writeLines(paste0("# computed by ", R.version.string, " (stats::aov) from specifications.csv; see src/test/r/influence-aov.R"), con)
write.csv(out, con, row.names = FALSE)
close(con)
