# Golden values for package evidence, computed independently in R.
# Run from this directory:
#   Rscript golden.R
# It writes golden.json (read by golden_test.go).
#
# - crps_normal: the closed form of Gneiting et al. (2005) evaluated with
#   pnorm/dnorm, and the defining integral
#   CRPS = ∫ (F(x) − 1{x ≥ y})² dx computed by stats::integrate, an
#   evaluation that does not use the closed form.
# - crps_sample: the fair (n(n−1)) and plug-in (n²) sample CRPS of small
#   samples by the O(n²) double sum.
# - binom: two-sided p-values of stats::binom.test.
# - order_ci: ranks j, k of the distribution-free 95 % quantile interval,
#   found by exhaustive search over pbinom.
num <- function(v) paste(formatC(v, digits = 17, format = "g"), collapse = ", ")

normal_cases <- rbind(
  c(0, 1, 0), c(0, 1, 1), c(0, 1, -2.5), c(10, 3, 4), c(2450, 63, 2600),
  c(-5, 0.2, -5.1), c(1, 2, 9), c(0, 1, 6))
crps_rows <- apply(normal_cases, 1, function(r) {
  mu <- r[1]; s <- r[2]; y <- r[3]
  z <- (y - mu) / s
  closed <- s * (z * (2 * pnorm(z) - 1) + 2 * dnorm(z) - 1 / sqrt(pi))
  lo <- integrate(function(x) pnorm(x, mu, s)^2, -Inf, y, rel.tol = 1e-12, abs.tol = 0)$value
  hi <- integrate(function(x) pnorm(x, mu, s, lower.tail = FALSE)^2, y, Inf, rel.tol = 1e-12, abs.tol = 0)$value
  sprintf('    {"mu": %s, "sigma": %s, "y": %s, "closed": %s, "integral": %s}',
    num(mu), num(s), num(y), num(closed), num(lo + hi))
})

set.seed(20261202)
samples <- list(c(3, 1, 2), round(rnorm(7, 50, 10), 2), rexp(25) * 100, c(1, 1, 2, 2, 2, 5))
ys <- c(2.5, 61.3, 40, 2)
sample_rows <- mapply(function(x, y) {
  n <- length(x)
  pair <- sum(abs(outer(x, x, "-")))
  fair <- mean(abs(x - y)) - pair / (2 * n * (n - 1))
  plugin <- mean(abs(x - y)) - pair / (2 * n^2)
  sprintf('    {"x": [%s], "y": %s, "fair": %s, "plugin": %s}', num(x), num(y), num(fair), num(plugin))
}, samples, ys)

binom_cases <- rbind(
  c(3, 30, 0.9), c(23, 30, 0.9), c(30, 30, 0.9), c(27, 30, 0.9), c(12, 30, 0.5),
  c(22, 30, 0.5), c(15, 30, 0.5), c(0, 10, 0.5), c(40, 60, 0.9), c(59, 60, 0.9),
  c(1, 100, 0.05), c(17, 100, 0.1), c(5, 7, 0.3), c(250, 500, 0.55))
binom_rows <- apply(binom_cases, 1, function(r)
  sprintf('    {"k": %d, "n": %d, "p": %s, "pvalue": %s}', r[1], r[2], num(r[3]),
    num(binom.test(r[1], r[2], r[3])$p.value)))

ci_cases <- rbind(c(500, 0.95), c(500, 0.5), c(1000, 0.99), c(100, 0.99), c(20, 0.5),
  c(10000, 0.01), c(50, 0.05), c(200, 0.9))
ci_rows <- apply(ci_cases, 1, function(r) {
  n <- r[1]; p <- r[2]
  m <- 0:(n + 1)
  lower_miss <- pbinom(m - 1, n, p)                       # P(B ≤ m − 1)
  upper_miss <- pbinom(m - 1, n, p, lower.tail = FALSE)   # P(B ≥ m)
  j <- max(m[m <= n & lower_miss <= 0.025], 0)
  k <- min(m[m >= 1 & upper_miss <= 0.025], n + 1)
  cover <- pbinom(k - 1, n, p) - pbinom(j - 1, n, p)
  sprintf('    {"n": %d, "p": %s, "j": %d, "k": %d, "coverage": %s}', n, num(p), j, k, num(cover))
})

cat(file = "golden.json", sep = "", "{\n",
  '  "source": "', R.version.string, '; evidence/testdata/golden.R",\n',
  '  "crps_normal": [\n', paste(crps_rows, collapse = ",\n"), '\n  ],\n',
  '  "crps_sample": [\n', paste(sample_rows, collapse = ",\n"), '\n  ],\n',
  '  "binom": [\n', paste(binom_rows, collapse = ",\n"), '\n  ],\n',
  '  "order_ci": [\n', paste(ci_rows, collapse = ",\n"), '\n  ]\n',
  "}\n")
