# Reference values for package diagnose.
#
# Run from this directory with R 4.2.2 (any R 4.x should agree to the test
# tolerances):
#
#     Rscript golden.R
#
# It writes ar1.csv and shocks.csv (the series the tests read) and golden.json
# (each value with the R call that produced it). tseries is used only as a
# cross-check of the Jarque–Bera formula, when installed; the reference is the
# formula itself.

stopifnot(getRversion() >= "4.0.0")

# --- series ------------------------------------------------------------------

# AR(1) with phi = 0.7, unit normal innovations, 1500 days.
set.seed(20240611)
ar <- as.numeric(arima.sim(model = list(ar = 0.7), n = 1500))

# The same series with missing days: 40 scattered single days plus a 25-day
# block, the way a station record loses readings.
gaps <- ar
set.seed(7)
gaps[sample(1500, 40)] <- NA
gaps[801:825] <- NA

# Unit-variance Student-t shocks (nu = 5, scaled by sqrt((nu - 2) / nu)).
set.seed(99)
nu <- 5
tscale <- sqrt((nu - 2) / nu)
shocks <- rt(400, df = nu) * tscale

fmt <- function(v) ifelse(is.na(v), "NA", sprintf("%.17g", v))
writeLines(c("ar,gaps", paste(fmt(ar), fmt(gaps), sep = ",")), "ar1.csv")
writeLines(c("shock", fmt(shocks)), "shocks.csv")

# --- helpers -----------------------------------------------------------------

acfvec <- function(x, lag) {
  drop(acf(x, lag.max = lag, plot = FALSE, na.action = na.pass)$acf)[-1]
}
pacfvec <- function(x, lag) {
  drop(pacf(x, lag.max = lag, plot = FALSE, na.action = na.pass)$acf)
}

# Population (biased) moments about the mean, missing values dropped.
pmom <- function(x, k) {
  x <- x[!is.na(x)]
  mean((x - mean(x))^k)
}
skew <- function(x) pmom(x, 3) / pmom(x, 2)^1.5
exkurt <- function(x) pmom(x, 4) / pmom(x, 2)^2 - 3
# Jarque and Bera (1987): JB = n/6 * (S^2 + (K - 3)^2 / 4), chi-square(2).
jb <- function(x) {
  n <- sum(!is.na(x))
  s <- n / 6 * (skew(x)^2 + exkurt(x)^2 / 4)
  list(statistic = s, df = 2, p = pchisq(s, 2, lower.tail = FALSE))
}

# Asymptotic Kolmogorov survival P(K > t) summed to double precision; ks.test
# truncates the same series (tol = 1e-6, and a single term below t = 1).
pkolm_upper <- function(t) {
  if (t < 1) {
    k <- 2 * (1:50) - 1
    1 - sqrt(2 * pi) / t * sum(exp(-k^2 * pi^2 / (8 * t^2)))
  } else {
    k <- 1:200
    2 * sum((-1)^(k - 1) * exp(-2 * k^2 * t^2))
  }
}
# The two series must agree where both converge.
for (t in c(0.8, 1, 1.3)) {
  k <- 1:200
  stopifnot(abs(pkolm_upper(t) - 2 * sum((-1)^(k - 1) * exp(-2 * k^2 * t^2))) < 1e-14)
}

# --- cases -------------------------------------------------------------------

vectors <- list()
tests <- list()
scalars <- list()

vec <- function(name, call, value) {
  vectors[[name]] <<- list(call = call, value = value)
}
tst <- function(name, call, statistic, df, p, p_accurate = NULL) {
  tests[[name]] <<- list(call = call, statistic = unname(statistic),
                         df = unname(df), p = unname(p), p_accurate = p_accurate)
}
sca <- function(name, call, value) {
  scalars[[name]] <<- list(call = call, value = value)
}

vec("acf_ar", "acf(ar, lag.max = 30, plot = FALSE, na.action = na.pass)", acfvec(ar, 30))
vec("acf_gaps", "acf(gaps, lag.max = 30, plot = FALSE, na.action = na.pass)", acfvec(gaps, 30))
vec("acf_shocks", "acf(shock, lag.max = 30, plot = FALSE, na.action = na.pass)", acfvec(shocks, 30))
vec("pacf_ar", "pacf(ar, lag.max = 30, plot = FALSE, na.action = na.pass)", pacfvec(ar, 30))
vec("pacf_gaps", "pacf(gaps, lag.max = 30, plot = FALSE, na.action = na.pass)", pacfvec(gaps, 30))
vec("pacf_shocks", "pacf(shock, lag.max = 30, plot = FALSE, na.action = na.pass)", pacfvec(shocks, 30))

box <- function(name, xname, x, lag, fitdf) {
  b <- Box.test(x, lag = lag, type = "Ljung-Box", fitdf = fitdf)
  call <- sprintf('Box.test(%s, lag = %d, type = "Ljung-Box", fitdf = %d); p_accurate = pchisq(Q, %d, lower.tail = FALSE)',
                  xname, lag, fitdf, lag - fitdf)
  tst(name, call, b$statistic, b$parameter, b$p.value,
      pchisq(b$statistic, lag - fitdf, lower.tail = FALSE))
}
box("lb_ar_10_0", "ar", ar, 10, 0)
box("lb_ar_20_1", "ar", ar, 20, 1)
box("lb_ar2_10_0", "ar^2", ar^2, 10, 0)
box("lb_ar2_20_1", "ar^2", ar^2, 20, 1)
box("lb_gaps_10_0", "gaps", gaps, 10, 0)
box("lb_gaps_20_1", "gaps", gaps, 20, 1)
box("lb_shocks_10_0", "shock", shocks, 10, 0)
box("lb_shocks_20_1", "shock", shocks, 20, 1)
box("lb_shocks2_10_0", "shock^2", shocks^2, 10, 0)
box("lb_shocks2_20_1", "shock^2", shocks^2, 20, 1)

jbcall <- "n/6 * (g1^2 + g2^2/4) with population moments, pchisq(JB, 2, lower.tail = FALSE)"
for (s in list(list("jb_ar", "ar", ar), list("jb_gaps", "gaps", gaps),
               list("jb_shocks", "shock", shocks))) {
  r <- jb(s[[3]])
  note <- ""
  # Cross-check against tseries::jarque.bera.test, which uses the same formula.
  if (requireNamespace("tseries", quietly = TRUE)) {
    tj <- tseries::jarque.bera.test(s[[3]][!is.na(s[[3]])])
    stopifnot(isTRUE(all.equal(unname(tj$statistic), r$statistic, tolerance = 1e-12)))
    note <- sprintf(" (agrees with tseries %s jarque.bera.test)", packageVersion("tseries"))
  }
  tst(s[[1]], paste0(jbcall, " on ", s[[2]], note), r$statistic, r$df, r$p)
}

skcall <- "mean((x - mean(x))^3) / mean((x - mean(x))^2)^1.5, NA dropped"
kucall <- "mean((x - mean(x))^4) / mean((x - mean(x))^2)^2 - 3, NA dropped"
sca("skew_ar", paste(skcall, "on ar"), skew(ar))
sca("skew_gaps", paste(skcall, "on gaps"), skew(gaps))
sca("skew_shocks", paste(skcall, "on shock"), skew(shocks))
sca("kurt_ar", paste(kucall, "on ar"), exkurt(ar))
sca("kurt_gaps", paste(kucall, "on gaps"), exkurt(gaps))
sca("kurt_shocks", paste(kucall, "on shock"), exkurt(shocks))

ks <- function(name, call, x, ...) {
  k <- suppressWarnings(ks.test(x, ..., exact = FALSE))
  n <- sum(!is.na(x))
  tst(name, paste0(call, "; p_accurate = P(K > sqrt(n) D) summed to double precision"),
      k$statistic, n, k$p.value, pkolm_upper(sqrt(n) * unname(k$statistic)))
}
ks("ks_shocks_norm", 'ks.test(shock, "pnorm", exact = FALSE)', shocks, "pnorm")
ks("ks_shocks_t", sprintf('ks.test(shock, function(q) pt(q / sqrt(3/5), df = 5), exact = FALSE)'),
   shocks, function(q) pt(q / tscale, df = nu))
ks("ks_shocks_shifted", 'ks.test(shock, "pnorm", mean = 0.25, exact = FALSE)', shocks, "pnorm", mean = 0.25)
ks("ks_gaps_norm", 'ks.test(gaps, "pnorm", sd = sqrt(1/0.51), exact = FALSE)', gaps, "pnorm", sd = sqrt(1 / 0.51))
ks("ks_ar_norm", 'ks.test(ar, "pnorm", exact = FALSE)', ar, "pnorm")

# QQ: for n > 10, ppoints(n) is (i - 0.5)/n, so the sorted qqnorm abscissae are
# the Hazen positions' normal quantiles.
stopifnot(isTRUE(all.equal(ppoints(400), ((1:400) - 0.5) / 400)))
vec("qq_shocks_norm_theoretical", "sort(qqnorm(shock, plot.it = FALSE)$x)",
    sort(qqnorm(shocks, plot.it = FALSE)$x))
vec("qq_shocks_norm_sample", "sort(qqnorm(shock, plot.it = FALSE)$y)",
    sort(qqnorm(shocks, plot.it = FALSE)$y))
vec("qq_gaps_t_theoretical", "qt(ppoints(sum(!is.na(gaps))), df = 5) * sqrt(3/5)",
    qt(ppoints(sum(!is.na(gaps))), df = nu) * tscale)

sca("confidence_bound_1500", "qnorm((1 + 0.95)/2) / sqrt(1500), as plot.acf with ci = 0.95",
    qnorm(0.975) / sqrt(1500))

# --- JSON --------------------------------------------------------------------

num <- function(v) {
  if (is.null(v)) return("null")
  s <- ifelse(is.na(v), "null", sprintf("%.17g", v))
  if (length(v) == 1) s else paste0("[", paste(s, collapse = ", "), "]")
}
str <- function(s) paste0('"', gsub('"', '\\\\"', s), '"')
obj <- function(entries, render) {
  body <- vapply(names(entries), function(k) paste0("    ", str(k), ": ", render(entries[[k]])), "")
  paste0("{\n", paste(body, collapse = ",\n"), "\n  }")
}
rvec <- function(e) paste0("{\"call\": ", str(e$call), ", \"value\": ", num(e$value), "}")
rsca <- rvec
rtst <- function(e) paste0("{\"call\": ", str(e$call), ", \"statistic\": ", num(e$statistic),
                           ", \"df\": ", num(e$df), ", \"p\": ", num(e$p),
                           ", \"p_accurate\": ", num(e$p_accurate), "}")
out <- paste0("{\n",
  "  \"generator\": ", str(paste0(R.version.string, ", testdata/golden.R")), ",\n",
  "  \"vectors\": ", obj(vectors, rvec), ",\n",
  "  \"tests\": ", obj(tests, rtst), ",\n",
  "  \"scalars\": ", obj(scalars, rsca), "\n}\n")
writeLines(out, "golden.json", sep = "")
