# Reference values for tests/calibration/*.cpp from base R only (Debian r-base-core):
#   glm(y ~ qlogis(p), binomial)                  -> calibration slope, its intercept, se, covariance
#   glm(y ~ 1, offset = qlogis(p), binomial)      -> calibration intercept and se
#   confint.default                               -> Wald intervals (coef +- qnorm se)
#   prop.test(k, n, correct = FALSE)$conf.int     -> Wilson score interval of each reliability bin
#   Spiegelhalter's (1986) z, transcribed from the paper's formula, and 2 pnorm(-|z|).
# Called by ref_calibration.py, which makes the seeded data with numpy and reads back what this
# prints: one line `name v1 v2 ...` per entry.
# Usage: Rscript ref_calibration.R data.csv cases...
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
cases <- args[-1]
put <- function(name, v) cat(name, sprintf("%.17g", v), "\n")
# Tight convergence, so that the reference is the maximum-likelihood estimate to ~1e-13.
ctl <- glm.control(epsilon = 1e-15, maxit = 200)
for (cs in cases) {
  r <- d[d$case == cs, ]
  x <- qlogis(r$p)
  w <- r$w
  s <- glm(r$y ~ x, family = binomial, weights = w, control = ctl)
  v <- vcov(s)
  put(paste0(cs, ".slope.coef"), coef(s))
  put(paste0(cs, ".slope.se"), sqrt(diag(v)))
  put(paste0(cs, ".slope.cov"), v[1, 2])
  put(paste0(cs, ".slope.wald95"), confint.default(s, "x", level = 0.95))
  put(paste0(cs, ".slope.wald90"), confint.default(s, "x", level = 0.90))
  # summary.glm's covariance is the inverse information at the weights of the last IRLS
  # iteration, i.e. at the iterate before the final coefficients; the inverse information
  # at the final coefficients (what heldout reports), from the fitted means:
  X <- cbind(1, x); mu <- fitted(s)
  vf <- solve(t(X) %*% (X * (w * mu * (1 - mu))))
  put(paste0(cs, ".slope.se_final"), sqrt(diag(vf)))
  put(paste0(cs, ".slope.cov_final"), vf[1, 2])
  i <- glm(r$y ~ 1, offset = x, family = binomial, weights = w, control = ctl)
  put(paste0(cs, ".intercept.coef"), coef(i))
  put(paste0(cs, ".intercept.se"), sqrt(diag(vcov(i))))
  put(paste0(cs, ".intercept.wald95"), confint.default(i, level = 0.95))
  mi <- fitted(i)
  put(paste0(cs, ".intercept.se_final"), 1 / sqrt(sum(w * mi * (1 - mi))))
  # Spiegelhalter (1986), Stat. Med. 5:421-433: unweighted.
  p <- r$p; y <- r$y
  z <- sum((y - p) * (1 - 2 * p)) / sqrt(sum((1 - 2 * p)^2 * p * (1 - p)))
  put(paste0(cs, ".spiegelhalter"), c(z, 2 * pnorm(-abs(z))))
  # Reliability: 10 equal-width bins (0, 0.1], ..., first [0, 0.1]; Wilson at 95% and 80%.
  for (m in c(10, 4)) {
    b <- cut(p, breaks = (0:m) / m, include.lowest = TRUE, right = TRUE, labels = FALSE)
    out <- c()
    for (j in sort(unique(b))) {
      k <- sum(y[b == j]); n <- sum(b == j)
      ci95 <- suppressWarnings(prop.test(k, n, correct = FALSE, conf.level = 0.95)$conf.int)
      ci80 <- suppressWarnings(prop.test(k, n, correct = FALSE, conf.level = 0.80)$conf.int)
      out <- c(out, j - 1, n, mean(p[b == j]), k / n, ci95, ci80)
    }
    put(paste0(cs, ".bins", m), out)
  }
}
