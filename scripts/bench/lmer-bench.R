# Benchmark reference: fits the nested random-intercept model with lmerTest::lmer (REML,
# Satterthwaite df) on a CSV, timed with lme4's default settings, then (untimed, optional)
# polishes the same fit with a much tighter optimiser tolerance, because on a million rows the
# default fit can stop short of the optimum, and recomputes lmerTest's Satterthwaite df on the
# polished fit. Given the other engine's variance components (JSON, R path names), it also
# evaluates lme4's own REML criterion there, and lmerTest's SEs and Satterthwaite df at exactly
# those components, both with lmerTest's default derivative steps and with steadier ones.
# Prints one JSON line.
# The model is the other engine's own formula (lme4 notation), so both fit the same maximal nested model.
# Usage: Rscript lmer-bench.R FILE FORMULA CONDITION REFERENCE [polish|no-polish] [COMPONENTS_JSON]
suppressPackageStartupMessages({
  library(lmerTest)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
if (length(args) < 4) stop("usage: lmer-bench.R FILE FORMULA CONDITION REFERENCE [polish]")
file <- args[1]
form <- as.formula(args[2])
response <- all.vars(form)[1]
condition <- args[3]
reference <- args[4]
polish <- length(args) >= 5 && args[5] == "polish"
other <- if (length(args) >= 6) fromJSON(args[6]) else NULL

elapsed <- function() proc.time()[["elapsed"]]
# CPU time of this process (all threads): less sensitive than wall time to other work on the machine.
cpu <- function() { p <- proc.time(); p[["user.self"]] + p[["sys.self"]] }

t0 <- elapsed()
c0 <- cpu()
d <- read.csv(file, stringsAsFactors = FALSE)
d[[condition]] <- relevel(factor(d[[condition]]), ref = reference)
labels <- levels(d[[condition]])
t1 <- elapsed()
c1 <- cpu()

mean_vector <- function(k) {
  L <- numeric(length(labels))
  L[1] <- 1
  if (k > 1) L[k] <- 1
  L
}

# Timed: what a user of lmerTest waits for (fit with Satterthwaite ingredients, coefficient table, condition means).
fit <- lmerTest::lmer(form, data = d, REML = TRUE)
coefs <- summary(fit)$coefficients
means <- lapply(seq_along(labels), function(k) {
  r <- lmerTest::contest1D(fit, mean_vector(k))
  list(condition = labels[k], estimate = r[["Estimate"]], se = r[["Std. Error"]], df = r[["df"]])
})
t2 <- elapsed()
c2 <- cpu()

components_of <- function(model) {
  vc <- as.data.frame(lme4::VarCorr(model))
  setNames(as.list(vc$vcov), ifelse(vc$grp == "Residual", "residual", vc$grp))
}
contrasts <- lapply(seq_along(labels)[-1], function(k) {
  row <- coefs[k, ]
  list(a = labels[k], b = labels[1], estimate = row[["Estimate"]], se = row[["Std. Error"]], df = row[["df"]], t = row[["t value"]])
})

out <- list(
  readSeconds = t1 - t0,
  fitSeconds = t2 - t1,
  readCpuSeconds = c1 - c0,
  fitCpuSeconds = c2 - c1,
  nObs = nrow(d),
  converged = is.null(fit@optinfo$conv$lme4$messages),
  components = components_of(fit),
  contrasts = contrasts,
  means = means,
  remlCriterion = unname(lme4::REMLcrit(fit)),
  versions = list(lme4 = as.character(packageVersion("lme4")), lmerTest = as.character(packageVersion("lmerTest")))
)

if (polish) {
  t3 <- elapsed()
  tight <- lme4::lmer(form, data = d, REML = TRUE, start = list(theta = lme4::getME(fit, "theta")),
    control = lme4::lmerControl(optimizer = "bobyqa", optCtrl = list(rhoend = 1e-12, maxfun = 1e5),
      check.conv.grad = "ignore", check.conv.singular = "ignore"))
  t4 <- elapsed()
  tightT <- lmerTest:::as_lmerModLmerTest(tight)
  tightCoefs <- summary(tightT)$coefficients
  out$polished <- list(
    seconds = t4 - t3,
    satterthwaiteSeconds = elapsed() - t4,
    components = components_of(tight),
    contrasts = lapply(seq_along(labels)[-1], function(k) {
      row <- tightCoefs[k, ]
      list(a = labels[k], b = labels[1], estimate = row[["Estimate"]], se = row[["Std. Error"]], df = row[["df"]])
    }),
    means = lapply(seq_along(labels), function(k) {
      r <- lmerTest::contest1D(tightT, mean_vector(k))
      list(condition = labels[k], estimate = r[["Estimate"]], se = r[["Std. Error"]], df = r[["df"]])
    }),
    remlCriterion = unname(lme4::REMLcrit(tight))
  )
}

if (!is.null(other)) {
  # lme4's theta is σ_term / σ per random term, named "<term>.(Intercept)".
  theta <- lme4::getME(fit, "theta")
  terms_of_theta <- sub("\\.\\(Intercept\\)$", "", names(theta))
  at <- sqrt(unlist(other[terms_of_theta]) / other[["residual"]])
  devfun <- lme4::lmer(form, data = d, REML = TRUE, devFunOnly = TRUE)
  out$criterionAtOther <- devfun(unname(at))
  # lmerTest's own SEs and Satterthwaite df evaluated at the other engine's variance components: a
  # model object assembled with lme4's modular functions at that theta, without optimising. This
  # separates how df are computed from where each optimiser stopped on a flat criterion.
  lf <- lme4::lFormula(form, data = d, REML = TRUE)
  dfun <- do.call(lme4::mkLmerDevfun, lf)
  opt <- list(par = unname(at), fval = dfun(unname(at)), conv = 0, message = "evaluated at given estimates")
  given <- lme4::mkMerMod(environment(dfun), opt, lf$reTrms, fr = lf$fr,
    mc = quote(lme4::lmer(formula = form, data = d, REML = TRUE)))
  givenT <- lmerTest:::as_lmerModLmerTest(given)
  givenCoefs <- summary(givenT)$coefficients
  out$atOther <- list(
    components = components_of(given),
    contrasts = lapply(seq_along(labels)[-1], function(k) {
      row <- givenCoefs[k, ]
      list(a = labels[k], b = labels[1], estimate = row[["Estimate"]], se = row[["Std. Error"]], df = row[["df"]])
    }),
    means = lapply(seq_along(labels), function(k) {
      r <- lmerTest::contest1D(givenT, mean_vector(k))
      list(condition = labels[k], estimate = r[["Estimate"]], se = r[["Std. Error"]], df = r[["df"]])
    })
  )
  # The same Satterthwaite formula from lmerTest's own pieces (devfun_vp, get_covbeta), but with
  # numDeriv's Richardson steps starting at 10 % of each parameter for both derivatives. lmerTest's
  # default Jacobian step (1e-4 relative) falls below the rounding noise of the deviance on a million
  # rows, which moves its df of a condition mean in the fourth digit from one step size to the next.
  beta <- lme4::fixef(given)
  varpar <- c(unname(at), sqrt(other[["residual"]]))
  steady <- list(eps = 1e-4, d = 0.1, zero.tol = sqrt(.Machine$double.eps / 7e-7), r = 4, v = 2)
  A <- 2 * solve(numDeriv::hessian(lmerTest:::devfun_vp, varpar, devfun = dfun, reml = TRUE, method.args = steady))
  satterthwaite <- function(L) {
    v_of <- function(p) drop(t(L) %*% lmerTest:::get_covbeta(p, dfun) %*% L)
    g <- numDeriv::grad(v_of, varpar, method.args = steady)
    list(estimate = sum(L * beta), se = sqrt(v_of(varpar)), df = 2 * v_of(varpar)^2 / drop(t(g) %*% A %*% g))
  }
  out$steadySteps <- list(
    # Taken before: the derivatives below move the deviance function's shared state.
    components = out$atOther$components,
    contrasts = lapply(seq_along(labels)[-1], function(k) {
      L <- numeric(length(labels))
      L[k] <- 1
      c(list(a = labels[k], b = labels[1]), satterthwaite(L))
    }),
    means = lapply(seq_along(labels), function(k) c(list(condition = labels[k]), satterthwaite(mean_vector(k))))
  )
}

cat(toJSON(out, auto_unbox = TRUE, digits = NA))
cat("\n")
