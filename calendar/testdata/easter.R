# Golden Easter Sunday dates for calendar.EasterSunday, from R's timeDate
# package (installed with r-cran-fgarch on Debian).
#
# Run from this directory:   Rscript easter.R
# Writes easter.csv: year,easter for 1583..4099 (the Gregorian range of the
# usual Easter tables), in ISO dates.
suppressPackageStartupMessages(library(timeDate))
years <- 1583:4099
dates <- format(as.Date(Easter(years)), "%Y-%m-%d")
out <- data.frame(year = years, easter = dates)
con <- file("easter.csv", "w")
writeLines(sprintf("# R %s, timeDate %s: timeDate::Easter(1583:4099); made by easter.R",
                   paste(R.version$major, R.version$minor, sep = "."), packageVersion("timeDate")), con)
write.csv(out, con, row.names = FALSE, quote = FALSE)
close(con)
