# Makes the two synthetic anomaly series in this folder from the two-component model
#
#   x_t = y_t + f_t                                          (no measurement noise)
#   y_t = phi_f * y_{t-1} + sigma(m_t) * eps_t,  eps_t ~ N(0,1)    fast part, sd by calendar month m_t
#   f_t = phi_s * f_{t-1} + s_F * sqrt(1 - phi_s^2) * eta_t,  eta_t ~ N(0,1)   slow part, stationary sd s_F
#   start: y_1 ~ N(0, sigma(m_1)^2 / (1 - phi_f^2)),  f_1 ~ N(0, s_F^2), independent.
#
# Run from the repository root:
#   Rscript statespace/testdata/make_series.R
# It writes statespace/testdata/series.csv (monthly sigma) and statespace/testdata/series_const.csv (constant sigma),
# columns date,x with one row per day 2001-01-01 .. 2020-12-31 (7305 rows) and a missing value written
# as an empty field. Deterministic: the same R version gives byte-identical files (R 4.2.2, default RNG
# "Mersenne-Twister" / "Inversion" / "Rejection").

RNGkind("Mersenne-Twister", "Inversion", "Rejection")

dir <- "statespace/testdata"
if (!dir.exists(dir)) stop("run from the repository root")

dates <- seq(as.Date("2001-01-01"), as.Date("2020-12-31"), by = "day")
n <- length(dates)                           # 7305
month <- as.integer(format(dates, "%m"))     # 1..12

phi_f <- 0.72
phi_s <- 0.975
sd_slow <- 0.9
sigma_monthly <- c(2.9, 2.8, 2.6, 2.3, 2.1, 1.9, 1.8, 1.8, 2.0, 2.3, 2.6, 2.8)
sigma_const <- 2.4

# Simulate one path of the model; sig is the fast-part innovation sd for each day (length n).
simulate <- function(sig, seed) {
  set.seed(seed)
  eps <- rnorm(n)
  eta <- rnorm(n)
  y <- numeric(n)
  f <- numeric(n)
  y[1] <- sig[1] / sqrt(1 - phi_f^2) * eps[1]
  f[1] <- sd_slow * eta[1]
  q <- sd_slow * sqrt(1 - phi_s^2)
  for (t in 2:n) {
    y[t] <- phi_f * y[t - 1] + sig[t] * eps[t]
    f[t] <- phi_s * f[t - 1] + q * eta[t]
  }
  y + f
}

# Gap pattern (shared by both series): a 12-day gap, a 40-day gap and 30 single missing days.
# Singles are drawn at random (own seed) and kept only if neither neighbour is missing, so each one
# is a true one-day gap; the first and last day stay observed.
gap_pattern <- function(seed) {
  miss <- rep(FALSE, n)
  g12 <- which(dates == as.Date("2004-03-10"))
  miss[g12:(g12 + 11)] <- TRUE                 # 2004-03-10 .. 2004-03-21
  g40 <- which(dates == as.Date("2013-11-20"))
  miss[g40:(g40 + 39)] <- TRUE                 # 2013-11-20 .. 2013-12-29
  set.seed(seed)
  singles <- 0
  while (singles < 30) {
    t <- sample.int(n - 2, 1) + 1              # 2 .. n-1
    if (!miss[t - 1] && !miss[t] && !miss[t + 1]) {
      miss[t] <- TRUE
      singles <- singles + 1
    }
  }
  miss
}

miss <- gap_pattern(seed = 20240611)
stopifnot(sum(miss) == 12 + 40 + 30)

write_series <- function(x, file) {
  x[miss] <- NA
  field <- ifelse(is.na(x), "", sprintf("%.6f", x))
  lines <- c("date,x", paste0(format(dates, "%Y-%m-%d"), ",", field))
  writeLines(lines, file.path(dir, file))   # "\n" line endings
}

write_series(simulate(sigma_monthly[month], seed = 7305001), "series.csv")
write_series(simulate(rep(sigma_const, n), seed = 7305002), "series_const.csv")
