# Reference values for the two-component (fast AR(1) + slow AR(1)) anomaly model on the two synthetic
# series in this folder: exact Gaussian log-likelihood at the true parameters, maximum-likelihood fits,
# the AR(1)-only fit (slow part switched off) and the likelihood-ratio statistic.
#
# Run from the repository root (about 3 minutes on one core):
#   Rscript statespace/testdata/golden.R
# It reads statespace/testdata/series.csv and statespace/testdata/series_const.csv (made by make_series.R) and writes
# statespace/testdata/golden.json with every number printed with 17 significant digits. Made with R 4.2.2
# (Debian r-base-core), base packages only. The layout of golden.json is described in README.md.
#
# The model (day t = 1..n, m_t = calendar month of day t):
#   x_t = y_t + f_t                                            no measurement noise
#   y_t = phi_f y_{t-1} + sigma(m_t) eps_t                     eps_t ~ N(0,1)
#   f_t = phi_s f_{t-1} + s_F sqrt(1 - phi_s^2) eta_t           eta_t ~ N(0,1), s_F = stationary sd of f
#   y_1 ~ N(0, sigma(m_1)^2 / (1 - phi_f^2)), f_1 ~ N(0, s_F^2), independent.
# A missing x_t: the filter predicts through day t but makes no update; the log-likelihood sums
#   -1/2 (log(2 pi) + log F_t + v_t^2 / F_t) over the observed days only (v_t innovation, F_t its variance).
# Kalman filter: Harvey (1989), "Forecasting, Structural Time Series Models and the Kalman Filter",
# Cambridge University Press, ch. 3; Durbin & Koopman (2012), "Time Series Analysis by State Space
# Methods", 2nd ed., Oxford University Press, sections 4.3 and 4.10 (missing observations).

RNGkind("Mersenne-Twister", "Inversion", "Rejection")
dir <- "statespace/testdata"
if (!file.exists(file.path(dir, "series.csv"))) stop("run from the repository root")

truth <- list(
  phi_fast = 0.72, phi_slow = 0.975, sd_slow = 0.9,
  sigma_monthly = c(2.9, 2.8, 2.6, 2.3, 2.1, 1.9, 1.8, 1.8, 2.0, 2.3, 2.6, 2.8),
  sigma_const = 2.4
)

read_series <- function(file) {
  d <- read.csv(file.path(dir, file), colClasses = c("character", "numeric"), na.strings = "")
  dates <- as.Date(d$date)
  stopifnot(identical(names(d), c("date", "x")), all(diff(dates) == 1),
            dates[1] == as.Date("2001-01-01"), dates[length(dates)] == as.Date("2020-12-31"))
  list(file = file.path(dir, file), x = d$x, month = as.integer(format(dates, "%m")),
       dates = dates)
}

# ---------------------------------------------------------------------------------------------
# 1. The exact log-likelihood by a plain two-state Kalman filter.
#
#   state s_t = (y_t, f_t)',  s_{t+1} = T s_t + w_{t+1},  T = diag(phi_f, phi_s),
#   w_{t+1} ~ N(0, Q_{t+1}),  Q_{t+1} = diag(sigma(m_{t+1})^2, s_F^2 (1 - phi_s^2)),
#   x_t = Z s_t with Z = (1, 1).
#   a = E[s_t | x_1..x_{t-1}], P = Var[s_t | x_1..x_{t-1}] (2x2 symmetric, kept as p11, p12, p22).
#   start: a = (0, 0), P = diag(sigma(m_1)^2 / (1 - phi_f^2), s_F^2).
#   update (x_t observed):  v = x_t - (a1 + a2),  F = Z P Z' = p11 + 2 p12 + p22,
#                           K = P Z' / F = ((p11 + p12) / F, (p12 + p22) / F),
#                           a <- a + K v,  P <- P - K K' F,
#                           loglik += -1/2 (log(2 pi) + log F + v^2 / F)
#   predict (always):       a <- T a,  P <- T P T' + Q_{t+1}
# sig_day is sigma(m_t) for every day t (length n); sd_slow = 0 gives the AR(1)-only model.
# ---------------------------------------------------------------------------------------------
kf_loglik <- function(x, sig_day, phi_f, phi_s, sd_slow) {
  n <- length(x)
  q_slow <- sd_slow^2 * (1 - phi_s^2)
  a1 <- 0; a2 <- 0
  p11 <- sig_day[1]^2 / (1 - phi_f^2); p12 <- 0; p22 <- sd_slow^2
  ll <- 0
  nobs <- 0L
  l2pi <- log(2 * pi)
  for (t in seq_len(n)) {
    xt <- x[t]
    if (!is.na(xt)) {
      v <- xt - a1 - a2
      F <- p11 + 2 * p12 + p22
      k1 <- (p11 + p12) / F
      k2 <- (p12 + p22) / F
      a1 <- a1 + k1 * v
      a2 <- a2 + k2 * v
      p11 <- p11 - k1 * k1 * F
      p12 <- p12 - k1 * k2 * F
      p22 <- p22 - k2 * k2 * F
      ll <- ll - 0.5 * (l2pi + log(F) + v * v / F)
      nobs <- nobs + 1L
    }
    if (t < n) {
      a1 <- phi_f * a1
      a2 <- phi_s * a2
      p11 <- phi_f * phi_f * p11 + sig_day[t + 1]^2
      p12 <- phi_f * phi_s * p12
      p22 <- phi_s * phi_s * p22 + q_slow
    }
  }
  attr(ll, "nobs") <- nobs
  ll
}
kf_loglik <- compiler::cmpfun(kf_loglik)

# ---------------------------------------------------------------------------------------------
# 2. Constant sigma: the sum of two independent AR(1)s is an ARMA(2,1).
#   (1 - phi_f B)(1 - phi_s B) x_t = (1 - phi_s B) sigma eps_t + (1 - phi_f B) q eta_t,  q^2 = s_F^2 (1 - phi_s^2)
#   AR side: ar1 = phi_f + phi_s, ar2 = -phi_f phi_s (R's sign: x_t = ar1 x_{t-1} + ar2 x_{t-2} + ...).
#   MA side u_t has lag-0/1 autocovariances g0 = sigma^2 (1 + phi_s^2) + q^2 (1 + phi_f^2),
#   g1 = -phi_s sigma^2 - phi_f q^2, and lag >= 2 zero, so u_t = a_t + theta a_{t-1} (R's MA sign) with
#   g0 = s2a (1 + theta^2), g1 = theta s2a: rho = g1/g0, theta = (1 - sqrt(1 - 4 rho^2)) / (2 rho) (|theta| < 1),
#   s2a = g1 / theta.
# ---------------------------------------------------------------------------------------------
to_arma <- function(phi_f, phi_s, sigma, sd_slow) {
  q2 <- sd_slow^2 * (1 - phi_s^2)
  g0 <- sigma^2 * (1 + phi_s^2) + q2 * (1 + phi_f^2)
  g1 <- -phi_s * sigma^2 - phi_f * q2
  rho <- g1 / g0
  theta <- if (rho == 0) 0 else (1 - sqrt(1 - 4 * rho^2)) / (2 * rho)
  list(ar = c(phi_f + phi_s, -phi_f * phi_s), ma = theta, sigma2 = if (theta == 0) g0 else g1 / theta)
}
# Inverse map: AR roots phi = (ar1 +- sqrt(ar1^2 + 4 ar2)) / 2 (phi_s the larger), then the 2x2 linear
# system  (1 + phi_s^2) sigma^2 + (1 + phi_f^2) q^2 = s2a (1 + theta^2),  -phi_s sigma^2 - phi_f q^2 = theta s2a.
from_arma <- function(ar, ma, sigma2) {
  disc <- ar[1]^2 + 4 * ar[2]
  if (disc < 0) stop("golden: complex AR roots, not a sum of two AR(1)s")
  phi_s <- (ar[1] + sqrt(disc)) / 2
  phi_f <- (ar[1] - sqrt(disc)) / 2
  A <- rbind(c(1 + phi_s^2, 1 + phi_f^2), c(-phi_s, -phi_f))
  v <- solve(A, c(sigma2 * (1 + ma^2), ma * sigma2))
  if (any(v <= 0)) stop("golden: ARMA(2,1) outside the two-AR(1) region")
  list(phi_fast = phi_f, phi_slow = phi_s, sigma = sqrt(v[1]), sd_slow = sqrt(v[2] / (1 - phi_s^2)))
}

# Full Gaussian log-likelihood of an ARMA(2,1) at a GIVEN innovation variance s2a from R's own filter.
# stats::KalmanLike(x, mod) runs the filter of makeARIMA's state-space form with unit innovation
# variance (its V = R R', Pn from the stationary covariance / s2a), so its innovation variances are
# F_t / s2a. It returns s2 = S / nu and Lik = 1/2 (log s2 + L / nu), with S = sum v_t^2 / (F_t / s2a),
# L = sum log(F_t / s2a) and nu the number of observed (non-NA) days. Hence S = nu s2, L = nu (2 Lik - log s2),
# and  loglik(s2a) = -1/2 (nu log(2 pi) + nu log s2a + L + S / s2a).
arima_loglik_at <- function(x, ar, ma, sigma2, SSinit) {
  mod <- makeARIMA(phi = ar, theta = ma, Delta = numeric(), SSinit = SSinit)
  kl <- KalmanLike(x, mod, nit = 0L, update = FALSE)
  nu <- sum(!is.na(x))
  S <- nu * kl$s2
  L <- nu * (2 * kl$Lik - log(kl$s2))
  -0.5 * (nu * log(2 * pi) + nu * log(sigma2) + L + S / sigma2)
}

# ---------------------------------------------------------------------------------------------
# 3. Maximum likelihood with optim on transformed parameters:
#   phi = tanh(u) in (-1, 1), s_F = exp(v), sigma = exp(w). BFGS with central differences
#   (ndeps 1e-5), reltol 1e-15, then restarted from its own optimum until the loglik no longer rises.
# ---------------------------------------------------------------------------------------------
# A trial point with |phi| rounding to 1 (tanh of a large step) gives an infinite start variance;
# BFGS needs a finite value there, so such points get a huge one and the line search backs off
# (the NaN warnings of log(F) at such points are suppressed).
guard <- function(v) if (is.finite(v)) v else 1e100

fit_optim <- function(negll, start) {
  ctrl <- list(reltol = 1e-15, maxit = 5000, ndeps = rep(1e-5, length(start)))
  par <- start
  best <- Inf
  for (round in 1:10) {
    r <- optim(par, negll, method = "BFGS", control = ctrl)
    if (r$convergence != 0) warning("optim convergence code ", r$convergence)
    improved <- best - r$value
    par <- r$par
    best <- r$value
    if (improved < 1e-10) break
  }
  list(par = par, value = best)
}

# Two-component model. monthly = TRUE: 12 sigmas by calendar month; FALSE: one sigma.
fit_two <- function(s, monthly, starts) {
  unpack <- function(p) {
    sig <- exp(p[4:length(p)])
    list(phi_fast = tanh(p[1]), phi_slow = tanh(p[2]), sd_slow = exp(p[3]), sigma = sig,
         sig_day = if (monthly) sig[s$month] else rep(sig, length(s$x)))
  }
  negll <- function(p) {
    u <- unpack(p)
    guard(suppressWarnings(-kf_loglik(s$x, u$sig_day, u$phi_fast, u$phi_slow, u$sd_slow)))
  }
  runs <- lapply(starts, function(st) {
    p0 <- c(atanh(st$phi_fast), atanh(st$phi_slow), log(st$sd_slow), log(st$sigma))
    r <- fit_optim(negll, p0)
    u <- unpack(r$par)
    if (!monthly && u$phi_fast > u$phi_slow) {
      # With one constant sigma the model is symmetric in its two AR(1)s: relabel so phi_fast < phi_slow.
      # (phi_f, sigma) <-> (phi_s, q) with q = s_F sqrt(1 - phi_s^2), the slow innovation sd.
      u <- list(phi_fast = u$phi_slow, phi_slow = u$phi_fast,
                sd_slow = u$sigma / sqrt(1 - u$phi_fast^2),
                sigma = u$sd_slow * sqrt(1 - u$phi_slow^2))
    }
    list(start = st, phi_fast = u$phi_fast, phi_slow = u$phi_slow, sd_slow = u$sd_slow,
         sigma = u$sigma, loglik = -r$value)
  })
  lls <- vapply(runs, function(r) r$loglik, 0)
  best <- runs[[which.max(lls)]]
  # Standard errors from the numerical Hessian of -loglik in the natural parameters.
  negll_nat <- function(th) {
    sig <- th[4:length(th)]
    -kf_loglik(s$x, if (monthly) sig[s$month] else rep(sig, length(s$x)), th[1], th[2], th[3])
  }
  th <- c(best$phi_fast, best$phi_slow, best$sd_slow, best$sigma)
  H <- optimHess(th, negll_nat, control = list(ndeps = rep(1e-4, length(th))))
  se <- sqrt(diag(solve(H)))
  # Largest |d loglik / d theta| at the optimum (central differences, step 1e-6), as a convergence check.
  grad <- vapply(seq_along(th), function(i) {
    h <- 1e-6; e <- replace(numeric(length(th)), i, h)
    -(negll_nat(th + e) - negll_nat(th - e)) / (2 * h)
  }, 0)
  list(best = best, runs = runs, se = se, grad = grad)
}

# AR(1)-only model (s_F = 0): phi and sigma (12 monthly or one).
fit_ar1 <- function(s, monthly, start_phi, start_sigma) {
  negll <- function(p) {
    sig <- exp(p[2:length(p)])
    guard(suppressWarnings(-kf_loglik(s$x, if (monthly) sig[s$month] else rep(sig, length(s$x)), tanh(p[1]), 0, 0)))
  }
  r <- fit_optim(negll, c(atanh(start_phi), log(start_sigma)))
  list(phi = tanh(r$par[1]), sigma = exp(r$par[2:length(r$par)]), loglik = -r$value)
}

monthly_sd <- function(s) vapply(1:12, function(m) sd(s$x[s$month == m], na.rm = TRUE), 0)

# ---------------------------------------------------------------------------------------------
# A small JSON writer, 17 significant digits.
# ---------------------------------------------------------------------------------------------
arr <- function(x) structure(x, class = "jarr")
num <- function(v) {
  if (!is.finite(v)) stop("non-finite value in golden output")
  sprintf("%.17g", v)
}
to_json <- function(x, indent = 0) {
  pad <- strrep("  ", indent); pad1 <- strrep("  ", indent + 1)
  if (inherits(x, "jarr")) {
    x <- unclass(x)
    if (is.character(x)) return(paste0("[", paste0('"', x, '"', collapse = ", "), "]"))
    return(paste0("[", paste(vapply(x, num, ""), collapse = ", "), "]"))
  }
  if (is.list(x)) {
    if (is.null(names(x))) {
      items <- vapply(x, to_json, "", indent = indent + 1)
      return(paste0("[\n", paste0(pad1, items, collapse = ",\n"), "\n", pad, "]"))
    }
    items <- vapply(names(x), function(k) paste0(pad1, '"', k, '": ', to_json(x[[k]], indent + 1)), "")
    return(paste0("{\n", paste(items, collapse = ",\n"), "\n", pad, "}"))
  }
  if (is.character(x)) return(paste0('"', gsub('"', '\\\\"', x), '"'))
  if (is.logical(x)) return(tolower(as.character(x)))
  if (is.integer(x)) return(as.character(x))
  if (length(x) != 1) stop("use arr() for vectors")
  num(x)
}

# =============================================================================================
# Series with monthly sigma
# =============================================================================================
s <- read_series("series.csv")
n_obs <- sum(!is.na(s$x))
ll_true <- kf_loglik(s$x, truth$sigma_monthly[s$month], truth$phi_fast, truth$phi_slow, truth$sd_slow)
cat(sprintf("series.csv: n = %d, observed = %d, loglik(truth) = %.12f\n", length(s$x), n_obs, ll_true))

sd_m <- monthly_sd(s)
starts_m <- list(
  list(phi_fast = 0.72, phi_slow = 0.975, sd_slow = 0.9, sigma = truth$sigma_monthly),
  list(phi_fast = 0.5, phi_slow = 0.9, sd_slow = 0.5, sigma = 0.7 * sd_m),
  list(phi_fast = 0.8, phi_slow = 0.99, sd_slow = 1.5, sigma = 0.5 * sd_m),
  list(phi_fast = 0.3, phi_slow = 0.95, sd_slow = 0.3, sigma = 0.9 * sd_m)
)
fm <- fit_two(s, monthly = TRUE, starts_m)
for (r in fm$runs) cat(sprintf("  start phi_f=%.2f phi_s=%.3f sF=%.2f -> loglik %.10f (phi_f=%.6f phi_s=%.6f sF=%.6f)\n",
                               r$start$phi_fast, r$start$phi_slow, r$start$sd_slow, r$loglik,
                               r$phi_fast, r$phi_slow, r$sd_slow))
cat(sprintf("  MLE phi_f=%.8f phi_s=%.8f sF=%.8f loglik=%.10f  max|grad|=%.2e\n", fm$best$phi_fast,
            fm$best$phi_slow, fm$best$sd_slow, fm$best$loglik, max(abs(fm$grad))))
am <- fit_ar1(s, monthly = TRUE, 0.7, sd_m * 0.7)
cat(sprintf("  AR(1)-only phi=%.8f loglik=%.10f  LR=%.8f\n", am$phi, am$loglik, 2 * (fm$best$loglik - am$loglik)))

run_summary <- function(runs) lapply(runs, function(r) list(
  start = list(phi_fast = r$start$phi_fast, phi_slow = r$start$phi_slow, sd_slow = r$start$sd_slow,
               sigma = arr(r$start$sigma)),
  loglik = r$loglik,
  end = list(phi_fast = r$phi_fast, phi_slow = r$phi_slow, sd_slow = r$sd_slow, sigma = arr(r$sigma))))

out_series <- list(
  file = s$file,
  n = length(s$x), n_observed = n_obs, first = "2001-01-01", last = "2020-12-31",
  truth = list(phi_fast = truth$phi_fast, phi_slow = truth$phi_slow, sd_slow = truth$sd_slow,
               sigma_monthly = arr(truth$sigma_monthly), loglik = as.numeric(ll_true),
               call = "kf_loglik(x, sigma_monthly[month], phi_fast, phi_slow, sd_slow)"),
  mle = list(phi_fast = fm$best$phi_fast, phi_slow = fm$best$phi_slow, sd_slow = fm$best$sd_slow,
             sigma_monthly = arr(fm$best$sigma), loglik = fm$best$loglik,
             se = list(phi_fast = fm$se[1], phi_slow = fm$se[2], sd_slow = fm$se[3],
                       sigma_monthly = arr(fm$se[4:15])),
             max_abs_gradient = max(abs(fm$grad)),
             call = "optim BFGS on (atanh phi_fast, atanh phi_slow, log sd_slow, log sigma[12]), reltol 1e-15, ndeps 1e-5, restarted; best of the starts below; se from optimHess in natural parameters",
             starts = run_summary(fm$runs)),
  ar1_only = list(phi = am$phi, sigma_monthly = arr(am$sigma), loglik = am$loglik,
                  call = "kf_loglik with sd_slow = 0, optim BFGS on (atanh phi, log sigma[12])"),
  lr = 2 * (fm$best$loglik - am$loglik)
)

# =============================================================================================
# Series with constant sigma
# =============================================================================================
c0 <- read_series("series_const.csv")
n_obs0 <- sum(!is.na(c0$x))
stopifnot(identical(is.na(c0$x), is.na(s$x)))
sig0 <- rep(truth$sigma_const, length(c0$x))
ll_true0 <- kf_loglik(c0$x, sig0, truth$phi_fast, truth$phi_slow, truth$sd_slow)
arma0 <- to_arma(truth$phi_fast, truth$phi_slow, truth$sigma_const, truth$sd_slow)
back0 <- from_arma(arma0$ar, arma0$ma, arma0$sigma2)
stopifnot(abs(back0$phi_fast - 0.72) < 1e-12, abs(back0$phi_slow - 0.975) < 1e-12,
          abs(back0$sigma - 2.4) < 1e-12, abs(back0$sd_slow - 0.9) < 1e-12)
ll_kl_G <- arima_loglik_at(c0$x, arma0$ar, arma0$ma, arma0$sigma2, "Gardner1980")
ll_kl_R <- arima_loglik_at(c0$x, arma0$ar, arma0$ma, arma0$sigma2, "Rossignol2011")
cat(sprintf("series_const.csv: loglik(truth) own filter %.12f, KalmanLike Rossignol2011 %.12f (diff %.2e), Gardner1980 %.12f (diff %.2e)\n",
            ll_true0, ll_kl_R, ll_true0 - ll_kl_R, ll_kl_G, ll_true0 - ll_kl_G))
if (abs(ll_true0 - ll_kl_R) > 1e-6) stop("golden: own filter and KalmanLike disagree at the truth")

# Check of the Lik/s2 algebra: the internal call with op = TRUE also returns the standardized
# innovations v_t / sqrt(F_t / s2a) (NA on missing days), so nu and S can be counted directly.
raw <- .Call(stats:::C_KalmanLike, c0$x,
             makeARIMA(arma0$ar, arma0$ma, numeric(), SSinit = "Rossignol2011"), 0L, TRUE, FALSE)
stopifnot(sum(!is.na(raw$resid)) == n_obs0,
          abs(sum(raw$resid^2, na.rm = TRUE) / n_obs0 - raw$values[1]) < 1e-12 * raw$values[1])

sd0 <- sd(c0$x, na.rm = TRUE)
starts_c <- list(
  list(phi_fast = 0.72, phi_slow = 0.975, sd_slow = 0.9, sigma = 2.4),
  list(phi_fast = 0.5, phi_slow = 0.9, sd_slow = 0.5, sigma = 0.7 * sd0),
  list(phi_fast = 0.8, phi_slow = 0.99, sd_slow = 1.5, sigma = 0.5 * sd0),
  list(phi_fast = 0.3, phi_slow = 0.95, sd_slow = 0.3, sigma = 0.9 * sd0)
)
fc <- fit_two(c0, monthly = FALSE, starts_c)
for (r in fc$runs) cat(sprintf("  start phi_f=%.2f phi_s=%.3f sF=%.2f -> loglik %.10f (phi_f=%.6f phi_s=%.6f sF=%.6f sigma=%.6f)\n",
                               r$start$phi_fast, r$start$phi_slow, r$start$sd_slow, r$loglik,
                               r$phi_fast, r$phi_slow, r$sd_slow, r$sigma))
cat(sprintf("  MLE phi_f=%.8f phi_s=%.8f sF=%.8f sigma=%.8f loglik=%.10f  max|grad|=%.2e\n",
            fc$best$phi_fast, fc$best$phi_slow, fc$best$sd_slow, fc$best$sigma, fc$best$loglik, max(abs(fc$grad))))

# stats::arima ML fit of the ARMA(2,1), mapped back to the components. The optimum has theta near -1
# and an AR root near 1; from its own default start (zeros, with transform.pars = TRUE) arima stops at a
# local optimum with near-cancelling AR and MA roots (recorded as arima_ml_default_start), and
# transform.pars = TRUE cannot start at the optimum (its inverse transform fails there). So arima is
# started at the ARMA form of the TRUE parameters (not at our MLE) with transform.pars = FALSE.
fit_arima <- function(SSinit, start) {
  arima(c0$x, order = c(2, 0, 1), include.mean = FALSE, method = "ML", SSinit = SSinit,
        init = start, transform.pars = is.null(start),
        optim.control = list(reltol = 1e-15, maxit = 2000, ndeps = rep(1e-6, 3)))
}
ar_fit <- fit_arima("Rossignol2011", c(arma0$ar, arma0$ma))
ar_back <- from_arma(ar_fit$coef[1:2], ar_fit$coef[3], ar_fit$sigma2)
# Full loglik at arima's own estimates through the independent filter (should equal arima's loglik).
ll_own_at_arima <- kf_loglik(c0$x, rep(ar_back$sigma, length(c0$x)), ar_back$phi_fast, ar_back$phi_slow, ar_back$sd_slow)
cat(sprintf("  arima ML loglik %.10f (own filter at its estimates %.10f); mapped phi_f=%.8f phi_s=%.8f sigma=%.8f sF=%.8f\n",
            ar_fit$loglik, ll_own_at_arima, ar_back$phi_fast, ar_back$phi_slow, ar_back$sigma, ar_back$sd_slow))
if (abs(ar_fit$loglik - fc$best$loglik) > 1e-6) stop("golden: arima ML and own MLE disagree")
ar_fit_G <- fit_arima("Gardner1980", c(arma0$ar, arma0$ma))
ar_fit_D <- fit_arima("Rossignol2011", NULL)
cat(sprintf("  arima ML (Gardner1980 start) loglik %.10f; from arima's default start %.10f (ar %.6f %.6f, ma %.6f)\n",
            ar_fit_G$loglik, ar_fit_D$loglik, ar_fit_D$coef[1], ar_fit_D$coef[2], ar_fit_D$coef[3]))

ac <- fit_ar1(c0, monthly = FALSE, 0.7, 0.7 * sd0)
ar1_arima <- arima(c0$x, order = c(1, 0, 0), include.mean = FALSE, method = "ML", SSinit = "Rossignol2011",
                   optim.control = list(reltol = 1e-15, ndeps = 1e-6))
cat(sprintf("  AR(1)-only phi=%.8f sigma=%.8f loglik=%.10f; arima(1,0,0) phi=%.8f sigma=%.8f loglik=%.10f; LR=%.8f\n",
            ac$phi, ac$sigma, ac$loglik, ar1_arima$coef[1], sqrt(ar1_arima$sigma2), ar1_arima$loglik,
            2 * (fc$best$loglik - ac$loglik)))

arma_mle <- to_arma(fc$best$phi_fast, fc$best$phi_slow, fc$best$sigma, fc$best$sd_slow)
out_const <- list(
  file = c0$file,
  n = length(c0$x), n_observed = n_obs0, first = "2001-01-01", last = "2020-12-31",
  truth = list(phi_fast = truth$phi_fast, phi_slow = truth$phi_slow, sd_slow = truth$sd_slow,
               sigma = truth$sigma_const, loglik = as.numeric(ll_true0),
               call = "kf_loglik(x, rep(sigma, n), phi_fast, phi_slow, sd_slow)",
               arma = list(ar = arr(arma0$ar), ma = arma0$ma, sigma2 = arma0$sigma2),
               loglik_kalmanlike = ll_kl_R,
               loglik_kalmanlike_gardner1980 = ll_kl_G,
               call_kalmanlike = "KalmanLike(x, makeARIMA(ar, ma, numeric(), SSinit = 'Rossignol2011')); loglik = -1/2 (nu log(2 pi) + nu log sigma2 + nu (2 Lik - log s2) + nu s2 / sigma2), nu = observed days"),
  mle = list(phi_fast = fc$best$phi_fast, phi_slow = fc$best$phi_slow, sd_slow = fc$best$sd_slow,
             sigma = fc$best$sigma, loglik = fc$best$loglik,
             se = list(phi_fast = fc$se[1], phi_slow = fc$se[2], sd_slow = fc$se[3], sigma = fc$se[4]),
             max_abs_gradient = max(abs(fc$grad)),
             arma = list(ar = arr(arma_mle$ar), ma = arma_mle$ma, sigma2 = arma_mle$sigma2),
             call = "optim BFGS on (atanh phi_fast, atanh phi_slow, log sd_slow, log sigma), reltol 1e-15, ndeps 1e-5, restarted; best of the starts below",
             starts = run_summary(fc$runs)),
  arima_ml = list(ar = arr(unname(ar_fit$coef[1:2])), ma = unname(ar_fit$coef[3]), sigma2 = ar_fit$sigma2,
                  loglik = ar_fit$loglik,
                  phi_fast = ar_back$phi_fast, phi_slow = ar_back$phi_slow, sigma = ar_back$sigma,
                  sd_slow = ar_back$sd_slow, loglik_own_filter = as.numeric(ll_own_at_arima),
                  loglik_gardner1980 = ar_fit_G$loglik,
                  call = "arima(x, order = c(2, 0, 1), include.mean = FALSE, method = 'ML', SSinit = 'Rossignol2011', init = c(truth$arma$ar, truth$arma$ma), transform.pars = FALSE, optim.control = list(reltol = 1e-15, maxit = 2000, ndeps = rep(1e-6, 3))); components by from_arma"),
  arima_ml_default_start = list(ar = arr(unname(ar_fit_D$coef[1:2])), ma = unname(ar_fit_D$coef[3]),
                                sigma2 = ar_fit_D$sigma2, loglik = ar_fit_D$loglik,
                                note = "a local optimum (near-cancelling AR and MA roots, outside the two-AR(1) region): arima's default start, transform.pars = TRUE"),
  ar1_only = list(phi = ac$phi, sigma = ac$sigma, loglik = ac$loglik,
                  arima_phi = unname(ar1_arima$coef[1]), arima_sigma = sqrt(ar1_arima$sigma2),
                  arima_loglik = ar1_arima$loglik,
                  call = "kf_loglik with sd_slow = 0, optim BFGS on (atanh phi, log sigma); arima(x, order = c(1, 0, 0), include.mean = FALSE, method = 'ML', SSinit = 'Rossignol2011')"),
  lr = 2 * (fc$best$loglik - ac$loglik)
)

out <- list(
  source = list(r = R.version.string, script = "statespace/testdata/golden.R",
                run = "Rscript statespace/testdata/golden.R (from the repository root)"),
  conventions = list(
    model = "x_t = y_t + f_t; y_t = phi_fast y_{t-1} + sigma(month of day t) eps_t; f_t = phi_slow f_{t-1} + sd_slow sqrt(1 - phi_slow^2) eta_t",
    start = "y_1 ~ N(0, sigma(month of day 1)^2 / (1 - phi_fast^2)), f_1 ~ N(0, sd_slow^2), independent",
    missing = "predict through a missing day, no update; loglik sums over observed days only",
    loglik = "sum over observed days of -1/2 (log(2 pi) + log F_t + v_t^2 / F_t)",
    lr = "2 (loglik of the two-component MLE - loglik of the AR(1)-only MLE); sd_slow = 0 is on the boundary, so the null distribution is not chi-square(2)"),
  series = out_series,
  series_const = out_const
)
writeLines(to_json(out), file.path(dir, "golden.json"))
cat("wrote", file.path(dir, "golden.json"), "\n")
