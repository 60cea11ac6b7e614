# Reference fits with lme4's glmer for the binary and count models of the statistics engine.
#
# Usage: Rscript tests/reference/glmer-reference.R spec.json
#
# spec.json is a list of data sets, each
#   { "id": "...", "csv": "path/to/data.csv",
#     "formula": "y ~ trt + (1|ID)",            # the engine's model.formula (cbind(s, n - s) ~ … with trials)
#     "family": "binomial" | "poisson",
#     "factors": [{ "name": "trt", "labels": ["placebo", "drug", "drug+"] }],   # reference first
#     "numeric": ["y", "age"],                  # response, trials and covariates
#     "contrasts": [[0, 1, 0], ...] }          # rows L: Wald z of each L beta from vcov(model)
# The engine's formula is fitted as it stands: the test thereby also checks it can be refitted elsewhere.
# Prints ONE JSON document: { "<id>": { components, beta, se, contrasts, anova }, ... } on stdout.
#
# glmer's default is nAGQ = 1 (the Laplace approximation), as the engine. The optimiser and PIRLS
# tolerances are tightened well beyond its defaults so that the reference's own convergence error stays
# far below the agreement the comparison asks for; vcov() uses glmer's finite-difference Hessian, as by
# default.

suppressPackageStartupMessages({
  library(lme4)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
if (length(args) != 1) stop("usage: Rscript glmer-reference.R spec.json")
specs <- fromJSON(args[1], simplifyVector = FALSE)

# tolPwrss: glmer's own PIRLS stops at 1e-7 by default, which leaves its Laplace deviance a little
# short of the conditional modes and bends the curvature its Hessian-based SEs come from by up to
# 0.3 %; run to convergence it agrees with the exact modes to ~1e-8.
control <- glmerControl(
  optimizer = "bobyqa",
  optCtrl = list(rhoend = 1e-10, maxfun = 1e5),
  tolPwrss = 1e-13,
  check.conv.singular = "ignore"
)

reference_fit <- function(spec) {
  d <- read.csv(spec$csv, colClasses = "character", na.strings = c("NA", ""), check.names = FALSE)
  form <- as.formula(spec$formula)
  for (v in unlist(spec$numeric)) d[[v]] <- as.numeric(d[[v]])
  for (f in spec$factors) d[[f$name]] <- factor(d[[f$name]], levels = unlist(f$labels))
  family <- if (spec$family == "binomial") binomial else poisson
  model <- glmer(form, data = d, family = family, control = control)
  # bobyqa can stop short when a covariate is far from 0 (its intercept and slope are then nearly
  # collinear): restart from where it stopped, as lme4's own convergence advice says.
  for (attempt in 1:5) {
    if (is.null(model@optinfo$conv$lme4$messages)) break
    start <- list(theta = getME(model, "theta"), fixef = getME(model, "fixef"))
    model <- suppressWarnings(glmer(form, data = d, family = family, control = control, start = start))
  }

  vc <- as.data.frame(VarCorr(model))
  beta <- fixef(model)
  V <- as.matrix(vcov(model))
  L <- do.call(rbind, lapply(spec$contrasts, function(row) unlist(row)))
  est <- drop(L %*% beta)
  se <- sqrt(diag(L %*% V %*% t(L)))
  z <- est / se
  out <- list(
    nObs = nobs(model),
    components = lapply(seq_len(nrow(vc)), function(i) list(group = vc$grp[i], variance = vc$vcov[i])),
    beta = I(unname(beta)),
    se = I(unname(sqrt(diag(V)))),
    singular = isSingular(model),
    contrasts = lapply(seq_along(est), function(i) list(estimate = est[i], se = se[i], z = z[i], p = 2 * pnorm(-abs(z[i]))))
  )
  # The same fixed effects without any random term: R's glm, the model every observation independent.
  plain <- glm(nobars(form), data = d, family = family)
  out$glm <- list(beta = I(unname(coef(plain))), se = I(unname(sqrt(diag(vcov(plain))))))
  out
}

results <- list()
for (spec in specs) results[[spec$id]] <- reference_fit(spec)
cat(toJSON(results, auto_unbox = TRUE, digits = NA, null = "null"))
cat("\n")
