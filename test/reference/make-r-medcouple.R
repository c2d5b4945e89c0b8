# Reference medcouple and adjusted-boxplot figures for Tailmark's tests, computed with R robustbase:
#   mc(x, doReflect = TRUE)               the medcouple (Brys, Hubert & Struyf 2004)
#   adjboxStats(x, doReflect = TRUE)      the adjusted boxplot (Hubert & Vandervieren 2008): Tukey's
#                                          hinges (fivenum), fences, values outside them
# and, beside them, the medcouple evaluated straight from its published definition by brute force
# (all pairs, O(n^2); "mcDefinition"). robustbase agrees with the definition except for samples of 3
# or 4 values all but one tied at the median, where it reports +-1 and the definition +-0.5; the
# "size3ties" set records both. doReflect = TRUE (robustbase's default only for n <= 100) is passed
# because without it robustbase's result can depart from the definition when values tie at the
# median.
# Run:  Rscript test/reference/make-r-medcouple.R > test/reference/r-medcouple.json
# Data sets are invented for the tests (no real claims).
suppressPackageStartupMessages(library(robustbase))
options(mc_doScale_quiet = TRUE)

num <- function(x) {
  if (length(x) == 0) return("[]")
  s <- ifelse(is.finite(x), sprintf("%.17g", x), "null")
  paste0("[", paste(s, collapse = ","), "]")
}
one <- function(x) if (is.finite(x)) sprintf("%.17g", x) else "null"

# The definition: median over x_i <= m <= x_j of ((x_j - m) - (m - x_i)) / (x_j - x_i); pairs of
# values tied at the median take sign(p - 1 - i - j) (0-based positions in z+ and z-, both sorted
# descending).
mcDefinition <- function(x) {
  x <- sort(x); m <- median(x)
  zp <- rev(x[x >= m] - m); zm <- rev(x[x <= m] - m)
  p <- length(zp); q <- length(zm)
  h <- outer(zp, zm, function(a, b) (a + b) / (a - b))
  tie <- outer(zp == 0, zm == 0, "&")
  s <- outer(seq_len(p) - 1, seq_len(q) - 1, function(i, j) sign(p - 1 - i - j))
  h[tie] <- s[tie]
  median(h)
}

set.seed(20261202)
sets <- list(
  lognormal60 = round(rlnorm(60, meanlog = 4, sdlog = 0.9), 2),
  gamma45 = round(rgamma(45, shape = 0.9, rate = 1 / 80), 2),
  normal31 = round(rnorm(31, mean = 200, sd = 20), 2),
  symmetric9 = c(10, 20, 30, 40, 50, 60, 70, 80, 90),
  leftskew25 = round(500 - rlnorm(25, meanlog = 3, sdlog = 0.8), 2),
  ties20 = c(12, 12, 15, 15, 15, 15, 18, 18, 20, 20, 20, 24, 24, 30, 35, 35, 40, 60, 60, 95),
  tiesAtMedian15 = c(5, 8, 9, 10, 10, 10, 10, 10, 10, 11, 14, 20, 26, 40, 75),
  size3 = c(18.5, 22, 940),
  size3ties = c(30, 30, 75),
  perDiem12 = c(45, 45, 45, 45, 45, 45, 45, 45, 46, 52, 310, 45),
  pareto120 = round(30 / runif(120)^(1 / 1.6), 2),
  largeTies300 = round(rlnorm(300, meanlog = 2, sdlog = 1))
)

out <- character(0)
for (name in names(sets)) {
  x <- sets[[name]]
  a <- adjboxStats(x, doReflect = TRUE)
  out <- c(out, sprintf(
    '  "%s": {"x": %s, "mc": %s, "mcDefinition": %s, "fivenum": %s, "fence": %s, "out": %s}',
    name, num(x), one(mc(x, doReflect = TRUE)), one(mcDefinition(x)), num(a$stats), num(a$fence), num(sort(a$out))))
}
cat("{\n")
cat(sprintf('  "_source": "R %s, robustbase %s: mc(x, doReflect = TRUE), adjboxStats(x, doReflect = TRUE) (coef 1.5, a -4, b 3, fivenum hinges); mcDefinition = brute-force median of the published kernel; script test/reference/make-r-medcouple.R",\n',
  paste(R.version$major, R.version$minor, sep = "."), as.character(packageVersion("robustbase"))))
cat(paste(out, collapse = ",\n"))
cat("\n}\n")
