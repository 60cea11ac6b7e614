# Reference fits with lme4 + lmerTest for the models the statistics engine fits.
#
# Usage: Rscript tests/reference/lmer-reference.R spec.json
#
# spec.json is a list of data sets, each
#   { "id": "...", "csv": "path/to/data.csv",
#     "formula": "length ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:animal)",  # the engine's model.formula
#     "factors": [{ "name": "treatment", "labels": ["vehicle", "KX-9"] }],  # level order, reference first
#     "covariates": ["soma"],
#     "contrasts": [[1, 0], [0, 1], ...],   # rows L: lmerTest contest(model, L, joint = FALSE)
#     "holm": [2, 3]                        # 1-based rows of `contrasts` to Holm-adjust together (may be empty)
#   }
# The engine's formula is fitted as it stands: the test thereby also checks that it can be refitted elsewhere.
# Prints ONE JSON document: { "<id>": { components, beta, se, contrasts, holm, anova, ... }, ... } on stdout.
#
# The optimiser tolerances are tightened well beyond lme4's defaults so that the reference's own
# convergence error stays far below the agreement the comparison asks for.

suppressPackageStartupMessages({
  library(lme4)
  library(lmerTest)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
if (length(args) != 1) stop("usage: Rscript lmer-reference.R spec.json")
specs <- fromJSON(args[1], simplifyVector = FALSE)

control <- lmerControl(
  optimizer = "nloptwrap",
  optCtrl = list(xtol_abs = 1e-12, ftol_abs = 1e-14, xtol_rel = 1e-12, ftol_rel = 1e-15, maxeval = 1e5),
  check.conv.singular = "ignore"
)

reference_fit <- function(spec) {
  d <- read.csv(spec$csv, colClasses = "character", na.strings = c("NA", ""), check.names = FALSE)
  form <- as.formula(spec$formula)
  response <- all.vars(form)[1]
  d[[response]] <- as.numeric(d[[response]])
  for (cv in unlist(spec$covariates)) d[[cv]] <- as.numeric(d[[cv]])
  for (f in spec$factors) d[[f$name]] <- factor(d[[f$name]], levels = unlist(f$labels))
  model <- lmerTest::lmer(form, data = d, REML = TRUE, control = control)

  vc <- as.data.frame(VarCorr(model))
  components <- lapply(seq_len(nrow(vc)), function(i) list(group = vc$grp[i], variance = vc$vcov[i]))
  beta <- fixef(model)
  out <- list(
    nObs = nobs(model),
    components = components,
    beta = I(unname(beta)),  # I(): stay an array when there is one coefficient
    se = I(unname(sqrt(diag(as.matrix(vcov(model)))))),
    remlCriterion = unname(model@devcomp$cmp["REML"]),
    singular = isSingular(model),
    optimizerMessage = model@optinfo$message
  )
  L <- do.call(rbind, lapply(spec$contrasts, function(row) unlist(row)))
  res <- contest(model, L, joint = FALSE)
  out$contrasts <- lapply(seq_len(nrow(res)), function(i) list(
    estimate = res[i, "Estimate"], se = res[i, "Std. Error"], df = res[i, "df"],
    t = res[i, "t value"], p = res[i, "Pr(>|t|)"]
  ))
  holm_rows <- unlist(spec$holm)
  out$holm <- I(if (length(holm_rows)) p.adjust(res[holm_rows, "Pr(>|t|)"], method = "holm") else numeric(0))
  if (length(beta) > 1) {
    a <- anova(model, type = 3, ddf = "Satterthwaite")
    out$anova <- lapply(seq_len(nrow(a)), function(i) list(
      term = rownames(a)[i], f = a[i, "F value"], df1 = a[i, "NumDF"], df2 = a[i, "DenDF"], p = a[i, "Pr(>F)"]
    ))
  }
  out
}

results <- list()
for (spec in specs) results[[spec$id]] <- reference_fit(spec)
cat(toJSON(results, auto_unbox = TRUE, digits = NA, null = "null"))
cat("\n")
