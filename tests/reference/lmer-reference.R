# Reference fits with lme4 + lmerTest for the nested mixed models of the statistics engine.
#
# Usage: Rscript tests/reference/lmer-reference.R spec.json
#
# spec.json is a list of data sets, each
#   { "id": "...", "csv": "path/to/data.csv", "response": "y",
#     "units": ["u1", "u2"],            # unit id columns, outermost first, already path-keyed
#     "condition": "cond" | null,        # fixed-effect column
#     "conditionLabels": ["ctl", ...] }  # level order, reference first
# The model is  response ~ condition + (1|u1) + (1|u2) + ...  fitted by REML.
# Prints ONE JSON document: { "<id>": { fit, contrasts, anova }, ... } on stdout.
#
# The optimiser tolerances are tightened well beyond lme4's defaults so that the reference's own
# convergence error stays far below the 1e-4 relative agreement the comparison asks for.

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

contest_rows <- function(model, L) {
  res <- contest(model, L, joint = FALSE)
  lapply(seq_len(nrow(res)), function(i) list(
    estimate = res[i, "Estimate"], se = res[i, "Std. Error"], df = res[i, "df"],
    t = res[i, "t value"], p = res[i, "Pr(>|t|)"]
  ))
}

reference_fit <- function(spec) {
  d <- read.csv(spec$csv, colClasses = "character", na.strings = c("NA", ""))
  d$y_ <- as.numeric(d[[spec$response]])
  units <- unlist(spec$units)
  for (u in units) d[[u]] <- factor(d[[u]])
  has_condition <- !is.null(spec$condition)
  rhs <- paste(sprintf("(1|%s)", units), collapse = " + ")
  if (has_condition) {
    labels <- unlist(spec$conditionLabels)
    d$cond_ <- factor(d[[spec$condition]], levels = labels)
    form <- as.formula(paste("y_ ~ cond_ +", rhs))
  } else {
    form <- as.formula(paste("y_ ~ 1 +", rhs))
  }
  model <- lmerTest::lmer(form, data = d, REML = TRUE, control = control)

  vc <- as.data.frame(VarCorr(model))
  components <- lapply(seq_len(nrow(vc)), function(i) list(group = vc$grp[i], variance = vc$vcov[i]))
  beta <- fixef(model)
  p <- length(beta)
  out <- list(
    nObs = nobs(model),
    components = components,
    beta = I(unname(beta)),  # I(): stay an array when there is one coefficient
    se = I(unname(sqrt(diag(as.matrix(vcov(model)))))),
    remlCriterion = unname(model@devcomp$cmp["REML"]),
    singular = isSingular(model),
    optimizerMessage = model@optinfo$message
  )

  # Condition means (intercept + effect), then all pairs "later − earlier" in label order.
  k <- if (has_condition) length(labels) else 1
  means_L <- t(sapply(seq_len(k), function(j) { l <- numeric(p); l[1] <- 1; if (j > 1) l[j] <- 1; l }))
  if (p == 1) means_L <- matrix(1, 1, 1)
  out$means <- contest_rows(model, means_L)
  if (k >= 2) {
    pairs <- list()
    for (i in 1:(k - 1)) for (j in (i + 1):k) {
      l <- numeric(p)
      l[j] <- 1
      if (i > 1) l[i] <- -1
      pairs[[length(pairs) + 1]] <- list(a = labels[j], b = labels[i], L = l)
    }
    L <- do.call(rbind, lapply(pairs, function(x) x$L))
    res <- contest_rows(model, L)
    holm <- p.adjust(sapply(res, function(r) r$p), method = "holm")
    out$pairwise <- lapply(seq_along(pairs), function(i) {
      c(list(a = pairs[[i]]$a, b = pairs[[i]]$b), res[[i]], list(pHolm = holm[i]))
    })
    a <- anova(model, type = 3, ddf = "Satterthwaite")
    out$anova <- list(f = a[1, "F value"], df1 = a[1, "NumDF"], df2 = a[1, "DenDF"], p = a[1, "Pr(>F)"])
  }
  out
}

results <- list()
for (spec in specs) results[[spec$id]] <- reference_fit(spec)
cat(toJSON(results, auto_unbox = TRUE, digits = NA, null = "null"))
cat("\n")
