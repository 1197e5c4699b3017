# Reference values for the temperature-model fit on the NOAA daily series in this folder.
#
# Run from the repository root:
#   Rscript testdata/noaa/golden.R
# It reads testdata/noaa/seattle.csv and testdata/noaa/new_york.csv and writes
# testdata/noaa/golden.json (all numbers with 15 significant digits). Made with R 4.2.2
# (Debian r-base-core) and fGarch 4022.89 (Debian r-cran-fgarch); the exact versions used are
# recorded in the JSON's "source" field. The layout of golden.json is described in README.md.
#
# Conventions (the same as the Go implementation's):
#   y = (temp_max + temp_min) / 2, t = days since 2000-01-01, w = 2*pi/365.25
#   mean model  y ~ 1 + t + sum_{k=1..K} cos(k w t) + sin(k w t), fitted by lm (QR)
#   anomaly     x = residuals of the K = 1 fit with trend
#   AR(1)       phi = coef of lm(x[2:n] ~ 0 + x[1:(n-1)])
#   innovations e_t = x_t - phi x_{t-1}, t = 2..n; z_t = e_t / sd(e in the calendar month of day t)

suppressPackageStartupMessages(library(fGarch))

dir <- "testdata/noaa"
if (!file.exists(file.path(dir, "seattle.csv"))) stop("run from the repository root")

epoch <- as.Date("2000-01-01")
w <- 2 * pi / 365.25

# ---------- a small JSON writer (15 significant digits) ----------
arr <- function(x) structure(x, class = "jarr")   # force a JSON array, even of length 1
num <- function(v) {
  if (!is.finite(v)) stop("non-finite value in golden output")
  if (v == 0) return("0")
  sprintf("%.15g", v)
}
to_json <- function(x, indent = 0) {
  pad <- strrep("  ", indent)
  pad1 <- strrep("  ", indent + 1)
  if (inherits(x, "jarr")) {
    x <- unclass(x)
    if (is.character(x)) return(paste0("[", paste0('"', x, '"', collapse = ", "), "]"))
    if (is.logical(x)) return(paste0("[", paste(tolower(as.character(x)), collapse = ", "), "]"))
    return(paste0("[", paste(vapply(x, num, ""), collapse = ", "), "]"))
  }
  if (is.list(x)) {
    keys <- names(x)
    if (is.null(keys)) stop("unnamed list")
    items <- vapply(seq_along(x), function(i)
      paste0(pad1, '"', keys[i], '": ', to_json(x[[i]], indent + 1)), "")
    return(paste0("{\n", paste(items, collapse = ",\n"), "\n", pad, "}"))
  }
  if (length(x) != 1) stop("vector without arr(): ", paste(head(x), collapse = " "))
  if (is.character(x)) return(paste0('"', gsub('"', '\\\\"', x), '"'))
  if (is.logical(x)) return(tolower(as.character(x)))
  if (is.integer(x)) return(as.character(x))
  num(x)
}

# ---------- helpers ----------
# Design matrix of the mean model: columns 1, t (optional), cos(k w t), sin(k w t) for k = 1..K.
design <- function(t, K, trend = TRUE) {
  cols <- list(a = rep(1, length(t)))
  if (trend) cols$b <- t
  for (k in seq_len(K)) {
    cols[[paste0("c", k)]] <- cos(k * w * t)
    cols[[paste0("s", k)]] <- sin(k * w * t)
  }
  do.call(cbind, cols)
}

ols_block <- function(y, t, K, trend) {
  X <- design(t, K, trend)
  fit <- lm(y ~ 0 + X)
  s <- summary(fit)
  # The intercept is a column of X, so R's "uncentred" R^2 of the ~0 form is wrong: compute it.
  rss <- sum(residuals(fit)^2)
  tss <- sum((y - mean(y))^2)
  list(
    fit = fit,
    json = list(
      call = paste0("lm(y ~ 0 + X), X = [", paste(colnames(X), collapse = ", "),
                    "] with a = 1,", if (trend) " b = t," else "", " ck = cos(k*w*t), sk = sin(k*w*t); ",
                    "se from summary(fit); r2 = 1 - rss/sum((y-mean(y))^2); BIC(fit), AIC(fit), logLik(fit)"),
      names = arr(colnames(X)),
      coef = arr(unname(coef(fit))),
      se = arr(unname(s$coefficients[, 2])),
      r2 = 1 - rss / tss,
      rss = rss,
      sigma = s$sigma,
      df_residual = as.integer(fit$df.residual),
      loglik = as.numeric(logLik(fit)),
      aic = AIC(fit),
      bic = BIC(fit)
    )
  )
}

# Unit-variance Student-t log density.
ldt_unit <- function(z, nu) {
  s <- sqrt((nu - 2) / nu)
  dt(z / s, nu, log = TRUE) - log(s)
}

pop_moments <- function(z) {
  d <- z - mean(z)
  m2 <- mean(d^2); m3 <- mean(d^3); m4 <- mean(d^4)
  c(g1 = m3 / m2^1.5, g2 = m4 / m2^2 - 3)
}

window_sd <- function(x, L) {
  nw <- length(x) %/% L
  m <- vapply(seq_len(nw), function(i) mean(x[((i - 1) * L + 1):(i * L)]), 0)
  list(call = paste0("sd(means of x[1:", L, "], x[", L + 1, ":", 2 * L, "], ...; incomplete last window dropped)"),
       length = as.integer(L), windows = as.integer(nw), sd = sd(m))
}

lb <- function(v, lag, fitdf, what) {
  b <- Box.test(v, lag = lag, type = "Ljung-Box", fitdf = fitdf)
  list(call = sprintf('Box.test(%s, lag = %d, type = "Ljung-Box", fitdf = %d)', what, lag, fitdf),
       statistic = unname(b$statistic), df = as.integer(b$parameter), p_value = b$p.value)
}

# ---------- one city ----------
city <- function(file) {
  d <- read.csv(file.path(dir, file), colClasses = c("character", "numeric", "numeric"))
  date <- as.Date(d$date)
  n <- nrow(d)
  gaps <- sum(diff(as.numeric(date)) - 1)
  if (any(diff(as.numeric(date)) <= 0)) stop(file, ": dates not increasing")
  if (anyNA(d$temp_max) || anyNA(d$temp_min)) stop(file, ": missing values")
  if (gaps != 0) stop(file, ": the daily grid has ", gaps, " missing days; this script assumes none")
  y <- (d$temp_max + d$temp_min) / 2
  t <- as.numeric(date - epoch)

  # Mean model.
  ols <- list()
  fits <- list()
  for (K in 1:4) {
    b <- ols_block(y, t, K, TRUE)
    fits[[K]] <- b$fit
    ols[[paste0("K", K)]] <- b$json
  }
  ols$K1_notrend <- ols_block(y, t, 1, FALSE)$json
  bics <- vapply(1:4, function(K) ols[[paste0("K", K)]]$bic, 0)
  ols$best_k_bic <- as.integer(which.min(bics))

  cf <- coef(fits[[1]])
  bb <- unname(cf[2]); cc <- unname(cf[3]); ss <- unname(cf[4])
  psi <- atan2(ss, cc)
  seasonal <- list(
    call = "from the K1 fit: amplitude = sqrt(c1^2 + s1^2); psi = atan2(s1, c1); theta = atan2(c1, s1); peak_day = 1 + (psi/w) %% 365.25; trough_day = 1 + (psi/w + 365.25/2) %% 365.25; trend_per_decade = b * 3652.5 (R's %% gives a result in [0, 365.25))",
    amplitude = sqrt(cc^2 + ss^2),
    psi = psi,
    theta = atan2(cc, ss),
    peak_day = 1 + (psi / w) %% 365.25,
    trough_day = 1 + (psi / w + 365.25 / 2) %% 365.25,
    trend_per_day = bb,
    trend_per_decade = bb * 3652.5
  )

  # Anomaly and AR(1).
  x <- unname(residuals(fits[[1]]))
  ar_fit <- lm(x[2:n] ~ 0 + x[1:(n - 1)])
  phi <- unname(coef(ar_fit))
  am <- arima(x, order = c(1, 0, 0), include.mean = FALSE, method = "CSS-ML")
  ar1 <- list(
    call = "x = residuals of the K1 fit; lm(x[2:n] ~ 0 + x[1:(n-1)])",
    phi = phi,
    se = unname(summary(ar_fit)$coefficients[1, 2]),
    sigma = summary(ar_fit)$sigma,
    n_pairs = as.integer(n - 1),
    arima = list(
      call = 'arima(x, order = c(1, 0, 0), include.mean = FALSE, method = "CSS-ML")',
      phi = unname(am$coef[1]),
      se = sqrt(am$var.coef[1, 1]),
      sigma2 = am$sigma2,
      loglik = am$loglik
    )
  )

  # AR order table on the common sample t = 6..n.
  Y <- x[6:n]
  L <- sapply(1:5, function(j) x[(6 - j):(n - j)])
  ar_order <- list(call = "for p = 1..5: lm(x[6:n] ~ 0 + L[, 1:p]), L[, j] = x[(6-j):(n-j)]; coef, se from summary, BIC(fit) and AIC(fit) (these count sigma as a parameter: p + 1)",
                   n = as.integer(length(Y)))
  pb <- numeric(5)
  for (p in 1:5) {
    Lp <- L[, 1:p, drop = FALSE]
    f <- lm(Y ~ 0 + Lp)
    pb[p] <- BIC(f)
    ar_order[[paste0("p", p)]] <- list(
      coef = arr(unname(coef(f))),
      se = arr(unname(summary(f)$coefficients[, 2])),
      rss = sum(residuals(f)^2),
      aic = AIC(f),
      bic = BIC(f)
    )
  }
  ar_order$best_p_bic <- as.integer(which.min(pb))

  # Innovations, monthly sigma, standardized shocks.
  e <- x[2:n] - phi * x[1:(n - 1)]
  mon <- as.integer(format(date[2:n], "%m"))
  sig <- vapply(1:12, function(m) sd(e[mon == m]), 0)
  cnt <- vapply(1:12, function(m) sum(mon == m), 0L)
  z <- e / sig[mon]
  monthly <- list(call = "e = x[2:n] - phi*x[1:(n-1)]; sigma[m] = sd(e[month(date[2:n]) == m]), m = 1..12",
                  sigma = arr(sig), count = arr(cnt))

  # Shock families.
  nz <- length(z)
  ll_norm <- sum(dnorm(z, log = TRUE))
  llt <- function(nu) sum(ldt_unit(z, nu))
  opt <- optimize(llt, c(2.05, 300), maximum = TRUE, tol = 1e-8)
  nu_t <- opt$maximum
  # Guard against a local maximum: scan a grid.
  grid <- c(seq(2.05, 10, by = 0.05), seq(10, 300, by = 0.5))
  gl <- vapply(grid, llt, 0)
  if (max(gl) > opt$objective + 1e-6) stop(file, ": optimize() missed the maximum of the t log-likelihood")

  nll_sstd <- function(p) -sum(dsstd(z, mean = 0, sd = 1, nu = 2 + exp(p[1]), xi = exp(p[2]), log = TRUE))
  best <- NULL
  ends <- NULL
  for (nu0 in c(nu_t, 5, 10, 30)) for (xi0 in c(0.8, 1, 1.25)) {
    o <- optim(c(log(nu0 - 2), log(xi0)), nll_sstd, method = "Nelder-Mead",
               control = list(reltol = 1e-12, maxit = 20000))
    o2 <- optim(o$par, nll_sstd, method = "BFGS", control = list(reltol = 1e-12, maxit = 1000))
    if (o2$value < o$value) o <- o2
    if (o$convergence != 0) stop(file, ": optim did not converge from nu0 = ", nu0, ", xi0 = ", xi0)
    ends <- rbind(ends, c(2 + exp(o$par[1]), exp(o$par[2]), -o$value))
    if (is.null(best) || o$value < best$value) best <- o
  }
  nu_s <- 2 + exp(best$par[1]); xi_s <- exp(best$par[2]); ll_s <- -best$value
  # The log-likelihood is flat in nu when the shocks are close to normal: record how far the
  # optima from the 12 starts spread, as a guide to the tolerance a test can use.
  near <- ends[ends[, 3] > ll_s - 1e-6, , drop = FALSE]

  aics <- c(normal = -2 * ll_norm, student_t = 2 - 2 * opt$objective, skewed_t = 4 - 2 * ll_s)
  shocks <- list(
    n = as.integer(nz),
    normal = list(call = "sum(dnorm(z, log = TRUE))", k = 0L, loglik = ll_norm, aic = unname(aics[1])),
    student_t = list(
      call = "optimize(function(nu) sum(dt(z/s, nu, log = TRUE) - log(s)), s = sqrt((nu-2)/nu), c(2.05, 300), maximum = TRUE, tol = 1e-8)",
      k = 1L, nu = nu_t, loglik = opt$objective, aic = unname(aics[2])),
    skewed_t = list(
      call = "optim over (log(nu-2), log(xi)) of -sum(fGarch::dsstd(z, mean = 0, sd = 1, nu, xi, log = TRUE)); Nelder-Mead then BFGS, reltol = 1e-12, best of 12 starts",
      k = 2L, nu = nu_s, xi = xi_s, loglik = ll_s, aic = unname(aics[3]),
      starts_nu_range = arr(range(near[, 1])), starts_xi_range = arr(range(near[, 2])),
      starts_loglik_range = arr(range(near[, 3]))),
    best_aic = names(which.min(aics))
  )

  # Diagnostics.
  mom <- pop_moments(z)
  jb <- nz / 6 * (mom[["g1"]]^2 + mom[["g2"]]^2 / 4)
  st <- sqrt((nu_t - 2) / nu_t)
  ks <- suppressWarnings(ks.test(z, function(q) pt(q / st, nu_t)))
  diagnostics <- list(
    acf = list(call = "acf(x, lag.max = 30, plot = FALSE)$acf[2:31] (lags 1..30)",
               values = arr(as.numeric(acf(x, lag.max = 30, plot = FALSE)$acf)[2:31])),
    pacf = list(call = "pacf(x, lag.max = 30, plot = FALSE)$acf (lags 1..30)",
                values = arr(as.numeric(pacf(x, lag.max = 30, plot = FALSE)$acf))),
    ljung_box = list(
      z_lag10 = lb(z, 10, 1, "z"),
      z_lag20 = lb(z, 20, 1, "z"),
      z2_lag10 = lb(z^2, 10, 0, "z^2"),
      z2_lag20 = lb(z^2, 20, 0, "z^2")
    ),
    moments = list(call = "d = z - mean(z); m_k = mean(d^k); g1 = m3/m2^1.5; g2 = m4/m2^2 - 3",
                   skewness = mom[["g1"]], excess_kurtosis = mom[["g2"]]),
    jarque_bera = list(call = "n/6 * (g1^2 + g2^2/4); pchisq(jb, 2, lower.tail = FALSE)",
                       statistic = jb, p_value = pchisq(jb, 2, lower.tail = FALSE)),
    ks_student_t = list(call = "ks.test(z, function(q) pt(q/sqrt((nu-2)/nu), nu)), nu = shocks.student_t.nu (z has ties from 0.1 degree rounding; the statistic is exact, the p-value approximate)",
                        nu = nu_t, statistic = unname(ks$statistic), p_value = ks$p.value)
  )

  windows <- list(w30 = window_sd(x, 30), w151 = window_sd(x, 151))

  list(
    file = paste0("testdata/noaa/", file),
    n = as.integer(n),
    first = format(date[1]),
    last = format(date[n]),
    missing_days = as.integer(gaps),
    y_mean = mean(y),
    ols = ols,
    seasonal = seasonal,
    ar1 = ar1,
    ar_order = ar_order,
    monthly_sigma = monthly,
    shocks = shocks,
    diagnostics = diagnostics,
    window_means = windows
  )
}

out <- list(
  source = list(
    r = R.version.string,
    fgarch = as.character(packageVersion("fGarch")),
    script = "testdata/noaa/golden.R",
    run = "Rscript testdata/noaa/golden.R (from the repository root)"
  ),
  conventions = list(
    y = "(temp_max + temp_min) / 2",
    t = "days since 2000-01-01",
    omega = w,
    x = "residuals of the K1 (with trend) fit",
    z = "(x[t] - phi*x[t-1]) / monthly_sigma[month of day t], t = 2..n"
  ),
  seattle = city("seattle.csv"),
  new_york = city("new_york.csv")
)

writeLines(to_json(out), file.path(dir, "golden.json"))
cat("wrote", file.path(dir, "golden.json"), "\n")
