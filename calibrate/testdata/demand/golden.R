# Reference values for the demand-model fit (calibrate/demand.go) on the invented demo data.
#
# Run from the repository root:
#   Rscript calibrate/testdata/demand/golden.R
# It reads demo/kestrel_bay_daily.csv (daily mean temperature, °C) and demo/lanternfield_demand.csv
# (daily load, GJ/day, and a holiday flag) and writes calibrate/testdata/demand/golden.json, every
# number with 15 significant digits. Made with R 4.2.2 (Debian r-base-core); the version used is
# recorded in the JSON's "source" field. It takes about ten seconds (the heating-and-cooling-band grid has ~36 000 fits).
#
# Conventions (the same as the Go implementation's):
#   days     the demand days that have a temperature (inner join on date, rows with an empty tavg dropped)
#   X        [1, tue, wed, thu, fri, sat, sun, holiday, hdd, cdd]: Monday is the reference day;
#            hdd = pmax(TbH - T, 0), cdd = pmax(T - TbC, 0); the one-sided forms keep one of the two, the heating-and-cooling
#            form has TbH = TbC
#   fit      lm(y ~ 0 + X) (QR); R^2 = 1 - RSS / sum((y - mean(y))^2)
#   BIC      BIC(fit) + (balance points) * log(n): R's BIC of the Gaussian lm, counting sigma, plus one
#            parameter per balance point
#   grid     balance points (lo:hi) / 10 with lo = ceiling(round(10 * q05, 6)), hi = floor(round(10 * q95, 6)),
#            q = quantile(T, c(0.05, 0.95), type = 7); TbH <= TbC for heating-and-cooling-band; the least RSS wins, the first on ties
#            (heating index outer, cooling index inner)
#   CV(RMSE) 100 * sqrt(RSS / (n - p)) / mean(y), NMBE = 100 * sum(y - yhat) / ((n - p) * mean(y)),
#            p = coefficients + balance points (ASHRAE Guideline 14-2014, from memory)
#   AR(1)    of the residuals u on consecutive days: lm(u[t] ~ 0 + u[t-1]); sigma = sqrt(RSS / (m - 1))
#   Box.test on the residuals laid on the daily grid (NA for the dropped days), lag 10, Ljung-Box

temps <- "demo/kestrel_bay_daily.csv"
loads <- "demo/lanternfield_demand.csv"
out_file <- "calibrate/testdata/demand/golden.json"
if (!file.exists(temps)) stop("run from the repository root")

# ---------- a small JSON writer (15 significant digits) ----------
arr <- function(x) structure(x, class = "jarr")
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
    return(paste0("[", paste(vapply(x, num, ""), collapse = ", "), "]"))
  }
  if (is.list(x)) {
    keys <- names(x)
    if (is.null(keys)) {
      items <- vapply(x, function(v) paste0(pad1, to_json(v, indent + 1)), "")
      return(paste0("[\n", paste(items, collapse = ",\n"), "\n", pad, "]"))
    }
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

# ---------- the joined days ----------
tt <- read.csv(temps, colClasses = c("character", "numeric"))
dd <- read.csv(loads, colClasses = c("character", "numeric", "integer"))
m <- merge(dd, tt, by = "date")
m <- m[!is.na(m$tavg), ]
m <- m[order(m$date), ]
date <- as.Date(m$date)
y <- m$load
T <- m$tavg
n <- length(y)
wd <- (as.POSIXlt(date)$wday + 6) %% 7   # Monday = 0 .. Sunday = 6
Z <- cbind(intercept = 1,
           tue = as.numeric(wd == 1), wed = as.numeric(wd == 2), thu = as.numeric(wd == 3),
           fri = as.numeric(wd == 4), sat = as.numeric(wd == 5), sun = as.numeric(wd == 6),
           holiday = as.numeric(m$holiday == 1))
tss <- sum((y - mean(y))^2)

design <- function(form, tbh, tbc) {
  X <- Z
  if (form %in% c("heating-only", "heating-and-cooling", "heating-and-cooling-band")) X <- cbind(X, hdd = pmax(tbh - T, 0))
  if (form == "heating-and-cooling") tbc <- tbh
  if (form %in% c("cooling-only", "heating-and-cooling", "heating-and-cooling-band")) X <- cbind(X, cdd = pmax(T - tbc, 0))
  X
}
n_bp <- function(form) if (form == "heating-and-cooling-band") 2 else if (form == "constant") 0 else 1

fixed_block <- function(form, tbh, tbc) {
  X <- design(form, tbh, tbc)
  fit <- lm(y ~ 0 + X)
  s <- summary(fit)
  rss <- sum(residuals(fit)^2)
  p <- ncol(X) + n_bp(form)
  u <- residuals(fit)
  consecutive <- which(diff(date) == 1)
  ar <- lm(u[consecutive + 1] ~ 0 + u[consecutive])
  grid <- rep(NA_real_, as.integer(max(date) - min(date)) + 1)
  grid[as.integer(date - min(date)) + 1] <- u
  lb <- Box.test(grid, lag = 10, type = "Ljung-Box")
  list(
    call = paste0("lm(y ~ 0 + X), X = [", paste(colnames(X), collapse = ", "), "] at TbH = ", tbh,
                  ", TbC = ", tbc, "; se from summary(fit); r2 = 1 - rss/tss; BIC(fit) + ", n_bp(form),
                  "*log(n); cv_rmse, nmbe by the Guideline 14 formulas with p = ", p,
                  "; ar1 = lm(u[t] ~ 0 + u[t-1]) on consecutive days; Box.test(grid, lag = 10, type = \"Ljung-Box\")"),
    names = arr(colnames(X)),
    coef = arr(unname(coef(fit))),
    se = arr(unname(s$coefficients[, 2])),
    r2 = 1 - rss / tss,
    rss = rss,
    bic = BIC(fit) + n_bp(form) * log(n),
    p = p,
    cv_rmse = 100 * sqrt(rss / (n - p)) / mean(y),
    nmbe = 100 * sum(u) / ((n - p) * mean(y)),
    ar1_phi = unname(coef(ar)),
    ar1_phi_se = unname(summary(ar)$coefficients[1, 2]),
    ar1_sigma = sqrt(sum(residuals(ar)^2) / (length(consecutive) - 1)),
    ar1_pairs = length(consecutive),
    ljung_box_10 = list(statistic = unname(lb$statistic), p_value = lb$p.value)
  )
}

rss_at <- function(form, tbh, tbc) {
  X <- design(form, tbh, tbc)
  sum(lm.fit(X, y)$residuals^2)
}

# ---------- the grid search ----------
q <- quantile(T, c(0.05, 0.95), type = 7, names = FALSE)
lo <- ceiling(round(10 * q[1], 6))
hi <- floor(round(10 * q[2], 6))
g <- (lo:hi) / 10

search <- function(form) {
  best <- list(rss = Inf)
  consider <- function(tbh, tbc) {
    X <- design(form, tbh, tbc)
    fit <- lm.fit(X, y)
    rss <- sum(fit$residuals^2)
    if (rss < best$rss) {
      k <- ncol(X)
      slopes <- unname(fit$coefficients[(ncol(Z) + 1):k])
      best <<- list(rss = rss, tbh = tbh, tbc = tbc, slopes = slopes,
                    bic = n * log(2 * pi * rss / n) + n + (k + n_bp(form) + 1) * log(n))
    }
  }
  if (form == "heating-and-cooling-band") {
    for (i in seq_along(g)) for (j in i:length(g)) consider(g[i], g[j])
  } else {
    for (b in g) consider(b, b)
  }
  bp <- switch(form, "heating-only" = best$tbh, "cooling-only" = best$tbc, "heating-and-cooling" = best$tbh,
               "heating-and-cooling-band" = c(best$tbh, best$tbc))
  list(balance_points = arr(bp), slopes = arr(best$slopes), rss = best$rss, bic = best$bic)
}

fit0 <- lm(y ~ 0 + Z)
rss0 <- sum(residuals(fit0)^2)

profile <- list()
add_profile <- function(form, tbh, tbc) {
  profile[[length(profile) + 1]] <<- list(form = form, tbh = tbh, tbc = tbc, rss = rss_at(form, tbh, tbc))
}
for (b in c(14.0, 14.5, 15.0, 15.4, 15.6, 16.0, 17.0)) add_profile("heating-only", b, b)
for (p in list(c(15.0, 22.0), c(15.4, 22.0), c(15.6, 22.0), c(16.0, 22.0), c(15.5, 21.0), c(15.5, 21.5),
               c(15.5, 22.5), c(15.5, 23.0), c(15.6, 23.0), c(14.0, 20.0), c(15.5, 15.5)))
  add_profile("heating-and-cooling-band", p[1], p[2])
for (b in c(15.5, 15.7, 18.0)) add_profile("heating-and-cooling", b, b)
for (b in c(18.0, 22.0)) add_profile("cooling-only", b, b)

out <- list(
  source = list(
    r = R.version.string,
    data = paste(temps, "and", loads, "(invented; see demo/TRUTH.md)"),
    script = "calibrate/testdata/demand/golden.R"
  ),
  days = list(n = n, first = as.character(min(date)), last = as.character(max(date)),
              holidays = sum(m$holiday == 1), q05 = q[1], q95 = q[2], grid_lo = lo / 10, grid_hi = hi / 10),
  fixed = list(
    "5p_15.5_22" = fixed_block("heating-and-cooling-band", 15.5, 22.0),
    "heating-only_15.5" = fixed_block("heating-only", 15.5, 15.5)
  ),
  constant = list(call = "lm(y ~ 0 + Z), Z = [intercept, tue..sun, holiday]; BIC(fit)", rss = rss0, bic = BIC(fit0)),
  profile = profile,
  search = list(
    "heating-only" = search("heating-only"),
    "cooling-only" = search("cooling-only"),
    "heating-and-cooling" = search("heating-and-cooling"),
    "heating-and-cooling-band" = search("heating-and-cooling-band")
  )
)
writeLines(to_json(out), out_file)
cat("wrote", out_file, "\n")
