# Reference values for package shocks, computed with R and fGarch.
#
# Run from the repository root:
#
#     Rscript shocks/testdata/golden.R
#
# It writes, next to this script:
#   golden.csv       log-density, CDF, quantile and upper-tail quantile of the
#                    unit-variance normal, Student-t and Fernández–Steel skewed t
#   sample_sstd.csv  3000 draws of rsstd(nu = 6, xi = 0.8), set.seed(20240611)
#   sample_std.csv   3000 draws of rstd(nu = 5), set.seed(20240612)
#   fits.csv         maximum-likelihood fits of both families to both samples
#
# Every file starts with comment lines naming R and fGarch versions.

suppressPackageStartupMessages(library(fGarch))

args <- commandArgs(trailingOnly = FALSE)
here <- dirname(normalizePath(sub("^--file=", "", args[grep("^--file=", args)])))
out <- function(name) file.path(here, name)
versions <- sprintf("# %s; fGarch %s", R.version.string, packageVersion("fGarch"))
num <- function(x) sprintf("%.17g", x)

write_csv <- function(df, name, what) {
  con <- file(out(name), "w")
  writeLines(c(sprintf("# %s", what), versions,
               "# written by shocks/testdata/golden.R; do not edit by hand"), con)
  write.csv(df, con, row.names = FALSE, quote = FALSE)
  close(con)
}

## Distribution functions --------------------------------------------------

xs <- c(-30, -10, -6, -4, -3, -2.5, -2, -1.5, -1, -0.75, -0.5, -0.25, -0.1, 0,
        0.1, 0.25, 0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4, 6, 10, 30)
ps <- c(1e-20, 2^-54, 1e-15, 1e-10, 1e-6, 1e-3, 0.01, 0.05, 0.1, 0.25, 0.4, 0.5, 0.6, 0.75,
        0.9, 0.95, 0.99, 0.999, 1 - 1e-6)
qs <- c(1e-20, 2^-54, 1e-15, 1e-10, 1e-6, 1e-3, 0.01, 0.1, 0.3)

rows <- list()
add <- function(family, nu, xi, kind, arg, value) {
  rows[[length(rows) + 1]] <<- data.frame(family = family, nu = nu, xi = xi,
    kind = kind, arg = num(arg), value = num(value))
}

# Normal: dnorm, pnorm, qnorm; the upper tail with lower.tail = FALSE.
add("normal", NA, NA, "logpdf", xs, dnorm(xs, log = TRUE))
add("normal", NA, NA, "cdf", xs, pnorm(xs))
add("normal", NA, NA, "quantile", ps, qnorm(ps))
add("normal", NA, NA, "upperquantile", qs, qnorm(qs, lower.tail = FALSE))

# Unit-variance Student-t: dt, pt, qt rescaled by s = sqrt(nu / (nu - 2)).
for (nu in c(2.05, 2.5, 5, 30, 100, 300)) {
  s <- sqrt(nu / (nu - 2))
  add("studentt", nu, NA, "logpdf", xs, dt(xs * s, df = nu, log = TRUE) + log(s))
  add("studentt", nu, NA, "cdf", xs, pt(xs * s, df = nu))
  add("studentt", nu, NA, "quantile", ps, qt(ps, df = nu) / s)
  add("studentt", nu, NA, "upperquantile", qs, qt(qs, df = nu, lower.tail = FALSE) / s)
}

# Fernández–Steel skewed t: dsstd, psstd, qsstd with mean = 0, sd = 1.
# qsstd(1 - q) loses the tail to cancellation in 1 - q, so the upper-tail
# quantile is fGarch's own .qsstd expression for p above the mode, written with
# qt(..., lower.tail = FALSE); it agrees with qsstd(1 - q) where 1 - q is exact.
upper_qsstd <- function(q, nu, xi) {
  m1 <- 2 * sqrt(nu - 2) / (nu - 1) / beta(1/2, nu/2)
  mu <- m1 * (xi - 1/xi)
  sigma <- sqrt((1 - m1^2) * (xi^2 + 1/xi^2) + 2 * m1^2 - 1)
  g <- 2 / (xi + 1/xi)
  s <- sqrt(nu / (nu - 2))
  (xi * qt(q / (g * xi), df = nu, lower.tail = FALSE) / s - mu) / sigma
}
for (par in list(c(5, 1), c(6, 0.8), c(3, 1.5), c(10, 0.5), c(2.5, 3), c(300, 0.7), c(2.05, 0.2))) {
  nu <- par[1]; xi <- par[2]
  add("skewt", nu, xi, "logpdf", xs, dsstd(xs, mean = 0, sd = 1, nu = nu, xi = xi, log = TRUE))
  add("skewt", nu, xi, "cdf", xs, psstd(xs, mean = 0, sd = 1, nu = nu, xi = xi))
  add("skewt", nu, xi, "quantile", ps, qsstd(ps, mean = 0, sd = 1, nu = nu, xi = xi))
  split <- 1 / (1 + xi^2)
  uq <- qs[1 - qs > split]
  check <- qsstd(1 - uq[uq >= 1e-3], mean = 0, sd = 1, nu = nu, xi = xi)
  stopifnot(all.equal(check, upper_qsstd(uq[uq >= 1e-3], nu, xi), tolerance = 1e-10))
  add("skewt", nu, xi, "upperquantile", uq, upper_qsstd(uq, nu, xi))
}
write_csv(do.call(rbind, rows), "golden.csv",
  "log-density, CDF, quantile and upper-tail quantile (value at 1 - arg) of unit-variance shocks")

## Samples and maximum-likelihood fits --------------------------------------

set.seed(20240611)
z_sstd <- rsstd(3000, mean = 0, sd = 1, nu = 6, xi = 0.8)
set.seed(20240612)
z_std <- rstd(3000, mean = 0, sd = 1, nu = 5)
write_csv(data.frame(z = num(z_sstd)), "sample_sstd.csv",
  "set.seed(20240611); rsstd(3000, mean = 0, sd = 1, nu = 6, xi = 0.8)")
write_csv(data.frame(z = num(z_std)), "sample_std.csv",
  "set.seed(20240612); rstd(3000, mean = 0, sd = 1, nu = 5)")

# Student-t: one-dimensional maximum of the unit-variance t log-likelihood.
fit_std <- function(z) {
  ll <- function(nu) sum(dstd(z, mean = 0, sd = 1, nu = nu, log = TRUE))
  o <- optimize(ll, c(2.05, 300), maximum = TRUE, tol = 1e-10)
  c(nu = o$maximum, xi = NA, loglik = o$objective)
}
# Skewed t: nlminb on the box nu in [2.05, 300], xi in [0.2, 5], from two
# starting points; the better optimum is kept.
fit_sstd <- function(z) {
  nll <- function(p) -sum(dsstd(z, mean = 0, sd = 1, nu = p[1], xi = p[2], log = TRUE))
  best <- NULL
  for (start in list(c(5, 1), c(10, 0.7))) {
    o <- nlminb(start, nll, lower = c(2.05, 0.2), upper = c(300, 5),
                control = list(rel.tol = 1e-10, eval.max = 5000, iter.max = 2000))
    stopifnot(o$convergence == 0)
    if (is.null(best) || o$objective < best$objective) best <- o
  }
  c(nu = best$par[1], xi = best$par[2], loglik = -best$objective)
}
normal_ll <- function(z) sum(dnorm(z, log = TRUE))

fits <- rbind(
  data.frame(sample = "sstd", family = "normal", t(c(nu = NA, xi = NA, loglik = normal_ll(z_sstd)))),
  data.frame(sample = "sstd", family = "studentt", t(fit_std(z_sstd))),
  data.frame(sample = "sstd", family = "skewt", t(fit_sstd(z_sstd))),
  data.frame(sample = "std", family = "normal", t(c(nu = NA, xi = NA, loglik = normal_ll(z_std)))),
  data.frame(sample = "std", family = "studentt", t(fit_std(z_std))),
  data.frame(sample = "std", family = "skewt", t(fit_sstd(z_std))))
fits$nu <- num(fits$nu); fits$xi <- num(fits$xi); fits$loglik <- num(fits$loglik)
write_csv(fits, "fits.csv",
  "maximum-likelihood fits: optimize() on sum(dstd(z, 0, 1, nu, log = TRUE)) over (2.05, 300); nlminb() on -sum(dsstd(z, 0, 1, nu, xi, log = TRUE)) over [2.05, 300] x [0.2, 5]")
