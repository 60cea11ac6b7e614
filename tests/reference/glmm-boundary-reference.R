# Reference fits for boundary cases of the binary and count models: R's glm() and lme4's glmer.
#
# Usage: Rscript tests/reference/glmm-boundary-reference.R spec.json
#
# spec.json is a list of data sets, each
#   { "id": "...", "csv": "path/to/data.csv",
#     "formula": "y ~ trt + (1|animal)",        # the engine's model.formula
#     "family": "binomial" | "poisson",
#     "factors": [{ "name": "trt", "labels": ["vehicle", "KX-9"] }],   # reference first
#     "numeric": ["y"],
#     "glmer": true | false,                   # also fit the formula with glmer
#     "contrasts": [[0, 1], ...] }             # rows L: Wald z of each L beta
# Prints ONE JSON document: { "<id>": { glm: {...}, glmer: {...} | null }, ... } on stdout.
#
# glm() runs to a deviance change of 1e-14 instead of its default 1e-8: its vcov uses the weights
# of the last IRLS step, which at the default stop still differ from the converged ones by ~3e-5
# relative. glmer runs with the tight tolerances of glmer-reference.R.

suppressPackageStartupMessages({
  library(lme4)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
if (length(args) != 1) stop("usage: Rscript glmm-boundary-reference.R spec.json")
specs <- fromJSON(args[1], simplifyVector = FALSE)

control <- glmerControl(
  optimizer = "bobyqa",
  optCtrl = list(rhoend = 1e-10, maxfun = 1e5),
  tolPwrss = 1e-13,
  check.conv.singular = "ignore"
)

wald <- function(beta, V, spec) {
  L <- do.call(rbind, lapply(spec$contrasts, function(row) unlist(row)))
  est <- drop(L %*% beta)
  se <- sqrt(diag(L %*% V %*% t(L)))
  z <- est / se
  lapply(seq_along(est), function(i) list(estimate = est[i], se = se[i], z = z[i], p = 2 * pnorm(-abs(z[i]))))
}

reference_fit <- function(spec) {
  d <- read.csv(spec$csv, colClasses = "character", check.names = FALSE)
  form <- as.formula(spec$formula)
  for (v in unlist(spec$numeric)) d[[v]] <- as.numeric(d[[v]])
  for (f in spec$factors) d[[f$name]] <- factor(d[[f$name]], levels = unlist(f$labels))
  family <- if (spec$family == "binomial") binomial else poisson

  plain <- glm(nobars(form), data = d, family = family, control = glm.control(epsilon = 1e-14, maxit = 100))
  out <- list(glm = list(
    beta = I(unname(coef(plain))),
    se = I(unname(sqrt(diag(vcov(plain))))),
    contrasts = wald(coef(plain), vcov(plain), spec)
  ), glmer = NULL)

  if (isTRUE(spec$glmer)) {
    model <- glmer(form, data = d, family = family, control = control)
    vc <- as.data.frame(VarCorr(model))
    V <- as.matrix(vcov(model))
    out$glmer <- list(
      singular = isSingular(model),
      components = lapply(seq_len(nrow(vc)), function(i) list(group = vc$grp[i], variance = vc$vcov[i])),
      beta = I(unname(fixef(model))),
      se = I(unname(sqrt(diag(V)))),
      contrasts = wald(fixef(model), V, spec)
    )
  }
  out
}

results <- list()
for (spec in specs) results[[spec$id]] <- reference_fit(spec)
cat(toJSON(results, auto_unbox = TRUE, digits = NA, null = "null"))
cat("\n")
