# Reproduce Plotbank's meta-analysis numbers in R with metafor.
# Documentation only (not run in CI). Input: a CSV of per-site-year effects exported from the API,
# with columns siteYearId, yi (yield response), vi (its sampling variance) and soilTestClass.
#
#   Rscript tests/reproduce-meta.R site-year-effects.csv
#
# Plotbank defaults: REML tau^2, Hartung-Knapp-Sidik-Jonkman CI (t, k-1 df, s^2 not truncated),
# prediction interval mu +/- t(k-2) * sqrt(tau^2 + SE^2), subgroups by a mixed-effects model.
library(metafor)

args <- commandArgs(trailingOnly = TRUE)
dat <- read.csv(if (length(args) > 0) args[1] else "site-year-effects.csv", stringsAsFactors = FALSE)
stopifnot(all(c("siteYearId", "yi", "vi", "soilTestClass") %in% names(dat)))

ctrl <- list(threshold = 1e-12, tol = 1e-12, maxiter = 100)   # Plotbank iterates to 1e-12

# 1. Random-effects model: metaAnalysis({ yi, vi, method: "REML", ci: "hksj" })
res <- rma(yi, vi, data = dat, method = "REML", test = "knha", control = ctrl)
print(res)                      # estimate, se, ci.lb/ci.ub (t, k-1), tau2, I2, H2, Q
confint(res)                    # Q-profile CI for tau2, tau, I2, H2 -> heterogeneityInterval
weights(res)                    # weightsPercent

# 2. Prediction intervals
predict(res)                    # predictionInterval.metafor: t(k-1) with the HKSJ se
k <- res$k
crit <- qt(0.975, df = k - 2)   # predictionInterval.tKMinus2 (Higgins, Thompson & Spiegelhalter 2009)
c(pi_lb = res$b[1] - crit * sqrt(res$tau2 + res$se^2),
  pi_ub = res$b[1] + crit * sqrt(res$tau2 + res$se^2))

# 3. Decision numbers: P(response on a new site-year > B), B = cost / price
B <- 24 / 4.80
1 - pt((B - res$b[1]) / sqrt(res$tau2 + res$se^2), df = k - 2)

# 4. Subgroups by soil-test class: subgroupAnalysis({ yi, vi, groups: soilTestClass, method: "REML", ci: "hksj" })
dat$soilTestClass <- factor(dat$soilTestClass)
sub <- rma(yi, vi, mods = ~ soilTestClass, data = dat, method = "REML", test = "knha", control = ctrl)
print(sub)                      # QM (F df1, df2), QE, residual tau2, R2 -> commonTau2.differences
rma(yi, vi, mods = ~ 0 + soilTestClass, data = dat, method = "REML", test = "knha", control = ctrl)  # per-level estimates

# Separate fits per class and Q_between (with test = "z", as in separate.qBetween)
fits <- lapply(split(dat, dat$soilTestClass), function(d) rma(yi, vi, data = d, method = "REML", control = ctrl))
est <- sapply(fits, function(f) f$b[1]); se <- sapply(fits, function(f) f$se)
w <- 1 / se^2; Qb <- sum(w * (est - sum(w * est) / sum(w))^2)
c(Q_between = Qb, df = length(est) - 1, p = pchisq(Qb, length(est) - 1, lower.tail = FALSE))
