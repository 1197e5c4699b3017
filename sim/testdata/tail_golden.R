# Golden values for sim.Summarize: R's quantile(type = 4) and the empirical
# expected shortfall of a fixed sample. Run from this directory:
#   Rscript tail_golden.R
set.seed(20261201)
x <- round(rgamma(1001, shape = 3, rate = 0.01), 3)   # a skewed "annual HDD"-like sample
probs <- c(0.01, 0.05, 0.10, 0.25, 0.50, 0.75, 0.90, 0.95, 0.99)
T <- c(2, 5, 10, 20, 50, 100)
n <- length(x)
es_hi <- function(a) mean(sort(x, decreasing = TRUE)[1:ceiling(a * n)])
es_lo <- function(a) mean(sort(x)[1:ceiling(a * n)])
num <- function(v) paste(formatC(v, digits = 17, format = "g"), collapse = ", ")
cat(file = "tail_golden.json", sep = "", "{\n",
  '  "source": "', R.version.string, '; tail_golden.R",\n',
  '  "x": [', num(x), '],\n',
  '  "quantile_type4": [', num(quantile(x, probs, type = 4, names = FALSE)), '],\n',
  '  "return_high_type4": [', num(quantile(x, 1 - 1 / T, type = 4, names = FALSE)), '],\n',
  '  "return_low_type4": [', num(quantile(x, 1 / T, type = 4, names = FALSE)), '],\n',
  '  "es95_high": ', num(es_hi(0.05)), ', "es99_high": ', num(es_hi(0.01)), ',\n',
  '  "es95_low": ', num(es_lo(0.05)), ', "es99_low": ', num(es_lo(0.01)), ',\n',
  '  "mean": ', num(mean(x)), ', "sd": ', num(sd(x)), ',\n',
  '  "exceed_600": ', num(mean(x > 600)), ', "below_100": ', num(mean(x < 100)), '\n',
  "}\n")
