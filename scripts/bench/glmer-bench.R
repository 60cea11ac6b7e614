# Benchmark reference for the binary model: fits the other engine's formula with lme4's glmer
# (binomial, Laplace, lme4's default settings), timed, and reports its estimates. Prints one JSON line.
# Usage: Rscript glmer-bench.R FILE FORMULA CONDITION REFERENCE
suppressPackageStartupMessages({
  library(lme4)
  library(jsonlite)
})
args <- commandArgs(trailingOnly = TRUE)
if (length(args) < 4) stop("usage: glmer-bench.R FILE FORMULA CONDITION REFERENCE")
elapsed <- function() proc.time()[["elapsed"]]
cpu <- function() { p <- proc.time(); p[["user.self"]] + p[["sys.self"]] }
t0 <- elapsed(); c0 <- cpu()
d <- read.csv(args[1], stringsAsFactors = FALSE)
d[[args[3]]] <- relevel(factor(d[[args[3]]]), ref = args[4])
t1 <- elapsed(); c1 <- cpu()
fit <- glmer(as.formula(args[2]), data = d, family = binomial)
coefs <- summary(fit)$coefficients
t2 <- elapsed(); c2 <- cpu()
vc <- as.data.frame(VarCorr(fit))
cat(toJSON(list(
  readSeconds = t1 - t0, fitSeconds = t2 - t1, readCpuSeconds = c1 - c0, fitCpuSeconds = c2 - c1,
  converged = is.null(fit@optinfo$conv$lme4$messages),
  components = setNames(as.list(vc$vcov), vc$grp),
  beta = unname(coefs[, "Estimate"]), se = unname(coefs[, "Std. Error"]),
  # On a million rows glmer's finite-difference Hessian (its default vcov) is noisy at its default PIRLS
  # tolerance and can understate SEs several-fold; the SEs from RX (Cov(beta) given theta) are steady.
  seRx = unname(sqrt(diag(as.matrix(suppressWarnings(vcov(fit, use.hessian = FALSE)))))),
  versions = list(lme4 = as.character(packageVersion("lme4")))
), auto_unbox = TRUE, digits = NA), "\n")
