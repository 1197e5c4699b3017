# Reference values for package extremes, computed with R and evd (second
# opinion: fExtremes::gevFit).
#
# Run from the repository root (about 10 s):
#
#     Rscript extremes/testdata/golden.R
#
# Needs: apt-get install r-base-core r-cran-evd r-cran-fextremes
# (ismev, the usual second opinion, is not packaged by Debian; fExtremes is.)
#
# It writes, next to this script:
#   oxford.csv             evd's `oxford` data (annual maximum temperature, °F, Oxford 1901–1980)
#   kestrel_bay_minima.csv 60 invented winter minima, °F: −rgev(60, -14, 5.5, -0.2), set.seed(20260415),
#                          rounded to 0.1
#   golden.csv             one row per reference value (dataset, quantity, T, value)
# and reads portpirie.csv (committed; see README.md).
#
# What each quantity is:
#   mu, sigma, xi, loglik   evd::fgev MLE and maximised log-likelihood, optimiser tightened
#                           (reltol 1e-15, ndeps 1e-6 on a scale of sd(x)) so the values are
#                           accurate to far better than the tests' tolerances
#   se_mu, se_sigma, se_xi  sqrt(diag(inverse observed information)), from a second fgev run started
#                           at the MLE with ndeps 1e-4 (a Hessian by differences needs a larger step)
#   level, se_level         return level z_p, p = 1/T, and its s.e.: fgev(x, prob = 1/T) re-parametrises
#                           loc by the quantile exceeded with probability p, so its s.e. is the delta-method one
#   prof_lo, prof_hi        95 % profile-likelihood interval for z_p: the deviance
#                           2{ℓ̂ − max_{σ,ξ} ℓ(z_p, σ, ξ)} (each point a tightened fgev(x, prob = p, quantile = z))
#                           crossing qchisq(0.95, 1), found by uniroot(tol = 1e-10) on each side
#   evdprof_lo, evdprof_hi  the same from evd's own confint(profile(fit, mesh = se/50)): linear
#                           interpolation on a grid of spacing se/50 (stored as evdprof_mesh)
#   xi_prof_lo, xi_prof_hi  95 % profile-likelihood interval for ξ, by uniroot as above
#   fext_mu, fext_sigma, fext_xi, fext_loglik   fExtremes::gevFit(x, type = "mle") (default optimiser)
#   logpdf, cdf, quantile   evd::dgev(log = TRUE), pgev, qgev (datasets "dist:μ:σ:ξ"; T column = argument)
# For the invented minima the fit is to y = −x; rows min_level, min_prof_lo, min_prof_hi are the
# minima return levels (the level below which the winter minimum falls once in T winters):
# −z_p(y), and the interval (−hi, −lo) of y's interval.

suppressPackageStartupMessages({
  library(evd)
  library(fExtremes)
})

args <- commandArgs(trailingOnly = FALSE)
here <- dirname(normalizePath(sub("^--file=", "", args[grep("^--file=", args)])))
out <- function(name) file.path(here, name)
versions <- sprintf("# %s; evd %s; fExtremes %s", R.version.string,
                    packageVersion("evd"), packageVersion("fExtremes"))
num <- function(x) sprintf("%.17g", x)
q95 <- qchisq(0.95, 1)
Ts <- c(20, 50, 100)

## Data --------------------------------------------------------------------

con <- file(out("oxford.csv"), "w")
writeLines(c("# Annual maximum temperature at Oxford, England, 1901-1980, degrees Fahrenheit.",
             "# Copied from the R package evd (data set `oxford`); see README.md.",
             versions, "year,tmax_F"), con)
write.table(data.frame(year = 1901:1980, tmax = as.numeric(oxford)), con,
            sep = ",", row.names = FALSE, col.names = FALSE, quote = FALSE)
close(con)

set.seed(20260415)
minima <- round(-evd::rgev(60, loc = -14, scale = 5.5, shape = -0.2), 1)
con <- file(out("kestrel_bay_minima.csv"), "w")
writeLines(c("# Invented: lowest daily minimum temperature of each winter (Dec-Feb), Kestrel Bay, degrees Fahrenheit.",
             "# Made by golden.R: round(-evd::rgev(60, loc = -14, scale = 5.5, shape = -0.2), 1) after set.seed(20260415).",
             versions, "winter,tmin_F"), con)
write.table(data.frame(winter = 1965:2024, tmin = minima), con,
            sep = ",", row.names = FALSE, col.names = FALSE, quote = FALSE)
close(con)

readdata <- function(name) read.csv(out(name), comment.char = "#")[[2]]
oxf <- readdata("oxford.csv")
pp <- readdata("portpirie.csv")
mins <- readdata("kestrel_bay_minima.csv")
stopifnot(length(oxf) == 80, length(pp) == 65, length(mins) == 60)

## Fitting helpers -----------------------------------------------------------

ctl <- function(x, k, ndeps) {
  s <- sd(x)
  list(reltol = 1e-15, maxit = 20000, ndeps = rep(ndeps, k),
       parscale = c(s, s, 1)[seq_len(k)])
}

# Tight fit: estimates and deviance from ndeps 1e-6, standard errors from a
# restart at the estimate with ndeps 1e-4.
fit_tight <- function(x, prob = NULL) {
  f1 <- fgev(x, prob = prob, std.err = FALSE, control = ctl(x, 3, 1e-6))
  f1 <- fgev(x, start = as.list(f1$estimate), prob = prob, std.err = FALSE,
             control = ctl(x, 3, 1e-6))
  f2 <- fgev(x, start = as.list(f1$estimate), prob = prob, control = ctl(x, 3, 1e-4))
  stopifnot(max(abs(f2$estimate - f1$estimate) / c(sd(x), sd(x), 1)) < 1e-6)
  list(estimate = f1$estimate, deviance = f1$deviance, std.err = f2$std.err, fit = f2)
}

# Profile deviance at a fixed value of one parameter, maximising over the other
# two: Nelder–Mead from the MLE's values, then BFGS from its optimum; the smaller
# deviance wins. Some of these inner fits warn "optimization may not have
# succeeded" (iteration limit at reltol 1e-14); the crossings agree with evd's own
# grid profile to within its interpolation error, see golden.csv.
profile_dev <- function(x, mle, fixed, prob = NULL) {
  free <- mle$estimate[!names(mle$estimate) %in% names(fixed)]
  best <- Inf
  for (grow in c(1, 2, 4, 8)) {
    start <- as.list(free)
    start$scale <- start$scale * grow
    args <- c(list(x = x, start = start, prob = prob, std.err = FALSE, warn.inf = FALSE), fixed)
    nm <- try(do.call(fgev, c(args, list(method = "Nelder-Mead",
                      control = list(reltol = 1e-14, maxit = 20000)))), silent = TRUE)
    if (!inherits(nm, "try-error") && nm$deviance < 1e5) {
      args$start <- as.list(nm$estimate)
      best <- min(best, nm$deviance)
    }
    bf <- try(do.call(fgev, c(args, list(control = ctl(x, 2, 1e-6)))), silent = TRUE)
    if (!inherits(bf, "try-error") && bf$deviance < 1e5) best <- min(best, bf$deviance)
    if (is.finite(best)) break
  }
  best - mle$deviance
}

# Crossing of the profile deviance with q95 on one side of the estimate.
crossing <- function(dev, est, se, side) {
  k <- 1
  while (dev(est + side * k * se) < q95) k <- k * 2
  inner <- if (k == 1) est else est + side * k / 2 * se
  uniroot(function(v) dev(v) - q95, sort(c(inner, est + side * k * se)), tol = 1e-10)$root
}

rows <- list()
add <- function(dataset, quantity, T, value) {
  rows[[length(rows) + 1]] <<- data.frame(dataset = dataset, quantity = quantity,
                                          T = T, value = num(value))
}

golden <- function(name, x) {
  mle <- fit_tight(x)
  est <- mle$estimate
  add(name, "mu", NA, est["loc"]); add(name, "sigma", NA, est["scale"]); add(name, "xi", NA, est["shape"])
  add(name, "se_mu", NA, mle$std.err["loc"]); add(name, "se_sigma", NA, mle$std.err["scale"])
  add(name, "se_xi", NA, mle$std.err["shape"])
  add(name, "loglik", NA, -mle$deviance / 2)

  fx <- gevFit(x, type = "mle")@fit
  add(name, "fext_mu", NA, fx$par.ests["mu"]); add(name, "fext_sigma", NA, fx$par.ests["beta"])
  add(name, "fext_xi", NA, fx$par.ests["xi"]); add(name, "fext_loglik", NA, -fx$nllh.final)

  xidev <- function(v) profile_dev(x, mle, list(shape = v))
  add(name, "xi_prof_lo", NA, crossing(xidev, est["shape"], mle$std.err["shape"], -1))
  add(name, "xi_prof_hi", NA, crossing(xidev, est["shape"], mle$std.err["shape"], +1))

  levels <- list()
  for (T in Ts) {
    p <- 1 / T
    q <- fit_tight(x, prob = p)
    stopifnot(abs(q$deviance - mle$deviance) < 1e-8)
    z <- q$estimate["quantile"]; se <- q$std.err["quantile"]
    # The re-parametrised fit must agree with Coles (3.4) at the MLE.
    y <- -log(1 - p)
    stopifnot(abs(z - (est["loc"] - est["scale"] / est["shape"] * (1 - y^(-est["shape"])))) < 1e-6 * sd(x))
    add(name, "level", T, z); add(name, "se_level", T, se)
    zdev <- function(v) profile_dev(x, q, list(quantile = v), prob = p)
    lo <- crossing(zdev, z, se, -1); hi <- crossing(zdev, z, se, +1)
    add(name, "prof_lo", T, lo); add(name, "prof_hi", T, hi)
    mesh <- se / 50
    pr <- suppressWarnings(profile(q$fit, which = "quantile", mesh = mesh, conf = 0.99))
    ci <- confint(pr, level = 0.95)
    add(name, "evdprof_lo", T, ci["quantile", "lower"]); add(name, "evdprof_hi", T, ci["quantile", "upper"])
    add(name, "evdprof_mesh", T, mesh)
    levels[[as.character(T)]] <- c(z, lo, hi)
  }
  invisible(list(mle = mle, levels = levels))
}

## Distribution functions ---------------------------------------------------
# evd's dgev/pgev/qgev at a few parameter sets, ξ = 0 and ±1e-8 included
# (dataset "dist:<mu>:<sigma>:<xi>"; T holds the argument z or p).

for (par in list(c(10, 2, 0.3), c(10, 2, -0.3), c(10, 2, 0), c(10, 2, 1e-8), c(10, 2, -1e-8),
                 c(-5, 0.5, 0.05))) {
  name <- sprintf("dist:%s:%s:%s", par[1], par[2], par[3])
  for (z in c(4, 7, 9, 10, 11, 13, 16, 20)) {
    add(name, "logpdf", z, evd::dgev(z, par[1], par[2], par[3], log = TRUE))
    add(name, "cdf", z, evd::pgev(z, par[1], par[2], par[3]))
  }
  for (p in c(1e-6, 0.01, 0.3, 0.5, 0.9, 0.99, 1 - 1e-6)) {
    add(name, "quantile", p, evd::qgev(p, par[1], par[2], par[3]))
  }
}

invisible(capture.output(golden("oxford", oxf)))
invisible(capture.output(golden("portpirie", pp)))
invisible(capture.output(g <- golden("kestrel_bay_minima_negated", -mins)))
for (T in Ts) {
  v <- g$levels[[as.character(T)]]
  add("kestrel_bay_minima", "min_level", T, -v[1])
  add("kestrel_bay_minima", "min_prof_lo", T, -v[3])
  add("kestrel_bay_minima", "min_prof_hi", T, -v[2])
  # The minima level is exceeded downwards with probability 1/T:
  # P(M < m) = P(−M > −m) = 1 − G(−m).
  est <- g$mle$estimate
  stopifnot(abs(1 - evd::pgev(v[1], est["loc"], est["scale"], est["shape"]) - 1 / T) < 1e-6)
}

con <- file(out("golden.csv"), "w")
writeLines(c("# GEV fits, return levels and profile-likelihood intervals; see golden.R for each quantity.",
             versions, "# written by extremes/testdata/golden.R; do not edit by hand"), con)
write.csv(do.call(rbind, rows), con, row.names = FALSE, quote = FALSE, na = "")
close(con)
