# Reference values for tests/reference/distributions-reference.test.ts. Reads a CSV of requests
# (kind, statistic or probability, df1, df2) and prints one line per request with R's answer to 17
# significant digits:
#   t_upper  pt(x, df1, lower.tail = FALSE)        f_upper  pf(x, df1, df2, lower.tail = FALSE)
#   chisq_upper  pchisq(x, df1, lower.tail = FALSE)  normal_upper  pnorm(x, lower.tail = FALSE)
#   t_quantile  qt(x, df1)
# Usage: Rscript distributions-reference.R requests.csv
args <- commandArgs(trailingOnly = TRUE)
req <- read.csv(args[1], header = FALSE, col.names = c("kind", "x", "df1", "df2"),
                colClasses = c("character", "numeric", "numeric", "numeric"))
value <- mapply(function(kind, x, df1, df2) switch(kind,
  t_upper = pt(x, df1, lower.tail = FALSE),
  f_upper = pf(x, df1, df2, lower.tail = FALSE),
  chisq_upper = pchisq(x, df1, lower.tail = FALSE),
  normal_upper = pnorm(x, lower.tail = FALSE),
  t_quantile = qt(x, df1),
  stop("unknown request ", kind)), req$kind, req$x, req$df1, req$df2)
writeLines(sprintf("%.17g", value))
