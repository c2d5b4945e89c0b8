# Reference statistics for Tailmark's scoring tests, computed with R's stats package
# (median, mad, mean, sd, quantile type 7) and robustbase (loaded to check it is present and to
# record its version; its Qn/Sn are not used by Tailmark).
# Run:  Rscript test/reference/make-r-fixture.R > test/reference/r-stats.json
# Data sets are invented for the tests (no real claims).
suppressPackageStartupMessages(library(robustbase))

num <- function(x) {
  if (length(x) == 0) return("[]")
  s <- ifelse(is.finite(x), sprintf("%.17g", x), "null")
  paste0("[", paste(s, collapse = ","), "]")
}
one <- function(x) if (is.finite(x)) sprintf("%.17g", x) else "null"

set.seed(20240611)
sets <- list(
  normal25 = round(rnorm(25, mean = 120, sd = 15), 2),
  lognormal40 = round(rlnorm(40, meanlog = 5, sdlog = 0.9), 2),
  madzero = c(45, 45, 45, 45, 45, 45, 45, 45, 46, 52, 310),
  ties = c(10, 10, 12, 12, 12, 15, 15, 20, 20, 20, 100),
  size3 = c(18.5, 22, 940),
  quartileinc = c(1, 2, 4, 7, 8, 9, 10, 12),
  masking = c(88, 92, 95, 97, 99, 100, 101, 103, 104, 106, 108, 111, 2400, 2550, 2700)
)

out <- character(0)
for (name in names(sets)) {
  x <- sets[[name]]
  m <- median(x)
  md <- mad(x)               # constant = 1.4826 (R default)
  md1 <- mad(x, constant = 1)
  q <- quantile(x, c(0.25, 0.75), type = 7, names = FALSE)
  z <- (x - m) / md          # robust z; NaN/Inf when MAD = 0 -> null
  meanad <- mean(abs(x - m))
  out <- c(out, sprintf(
    '  "%s": {"x": %s, "median": %s, "mad": %s, "mad1": %s, "mean": %s, "sd": %s, "q1": %s, "q3": %s, "meanAbsDevMedian": %s, "robustZ": %s, "classicZ": %s}',
    name, num(x), one(m), one(md), one(md1), one(mean(x)), one(sd(x)), one(q[1]), one(q[2]), one(meanad),
    num(z), num((x - mean(x)) / sd(x))))
}
cat("{\n")
cat(sprintf('  "_source": "R %s, stats::median/mad/mean/sd/quantile(type=7); robustbase %s; script test/reference/make-r-fixture.R",\n',
  paste(R.version$major, R.version$minor, sep = "."), as.character(packageVersion("robustbase"))))
cat(paste(out, collapse = ",\n"))
cat("\n}\n")
