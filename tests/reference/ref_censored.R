# Reference values for tests/censored/*.cpp, computed with base R and the survival package
# (Therneau; Debian r-cran-survival). Called by ref_censored.py, which makes the seeded data
# with numpy and reads back what this prints: one line `name v1 v2 ...` per entry.
# Usage: Rscript ref_censored.R data.csv horizon t_auc grid...
suppressPackageStartupMessages(library(survival))
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
tau <- as.numeric(args[2])
t0 <- as.numeric(args[3])
grid <- as.numeric(args[4:length(args)])
put <- function(name, v) cat(name, sprintf("%.17g", v), "\n")

y <- Surv(d$time, d$event)
# Harrell's C (timewt = "n") and its infinitesimal-jackknife variance; reverse = TRUE: a higher
# risk predicts an earlier event.
# The paired variance of a - b: from the per-row influence (dfbeta) that concordance returns
# with influence = 1, var(C_a - C_b) = sum_k (infl_a[k] - infl_b[k])^2.
both <- function(...) {
  ca <- concordance(y ~ a, data = d, reverse = TRUE, influence = 1, ...)
  cb <- concordance(y ~ b, data = d, reverse = TRUE, influence = 1, ...)
  list(value = c(coef(ca), coef(cb)), var = c(ca$var, cb$var),
       diff_var = sum((ca$dfbeta - cb$dfbeta)^2), ia = ca$dfbeta)
}
h <- both(timewt = "n")
put("harrell.value", h$value); put("harrell.var", h$var); put("harrell.diff_var", h$diff_var)
put("harrell.influence_a", h$ia)
u <- both(timewt = "n/G2", ymax = tau)
put("uno.value", u$value); put("uno.var", u$var); put("uno.diff_var", u$diff_var)
u_all <- concordance(y ~ a, data = d, reverse = TRUE, timewt = "n/G2")
put("uno_all.value", coef(u_all)); put("uno_all.var", u_all$var)

# Kaplan-Meier of the censoring times (survfit with the roles swapped), on the rows without
# an event and a censoring at one time (survfit keeps tied events in the risk set).
g <- survfit(Surv(d$time2, 1 - d$event2) ~ 1)
put("km.time", g$time); put("km.surv", g$surv)

# G from the concordance convention (events leave first at a tied time), written out for
# the IPCW formulas below: G(t) = prod_{s <= t} (1 - c_s / (n_s - d_s)).
Gfun <- function(time, event) {
  s <- sort(unique(time[event == 0]))
  vals <- numeric(length(s)); g <- 1
  for (k in seq_along(s)) {
    n <- sum(time >= s[k]); dd <- sum(time == s[k] & event == 1); cc <- sum(time == s[k] & event == 0)
    g <- g * (1 - cc / (n - dd)); vals[k] <- g
  }
  list(at = function(t) { k <- sum(s <= t); if (k == 0) 1 else vals[k] },
       before = function(t) { k <- sum(s < t); if (k == 0) 1 else vals[k] })
}
G <- Gfun(d$time, d$event)
put("G.at_grid", sapply(grid, G$at)); put("G.before_grid", sapply(grid, G$before))

# Cumulative/dynamic AUC at t0 with IPCW (Uno et al. 2007; Heagerty & Zheng 2005):
# sum_i sum_j w_i [I(r_i > r_j) + I(r_i = r_j)/2] / (sum_i w_i * #controls).
auc_at <- function(r, t0) {
  case <- d$time <= t0 & d$event == 1; ctrl <- d$time > t0
  w <- 1 / sapply(d$time[case], G$before)
  rc <- r[case]; rj <- r[ctrl]
  num <- sum(w * sapply(rc, function(x) sum(x > rj) + 0.5 * sum(x == rj)))
  num / (sum(w) * length(rj))
}
put("auc_at.a", auc_at(d$a, t0))

# IPCW Brier score at t (Graf et al. 1999), predicted survival S_i = exp(-exp(a_i) * t / 5).
surv <- function(t) exp(-exp(d$a) * t / 5)
brier <- function(t) {
  S <- surv(t)
  ev <- d$time <= t & d$event == 1; al <- d$time > t
  gb <- sapply(d$time, G$before)
  sum(ifelse(ev, S^2 / gb, 0)) / nrow(d) + sum(ifelse(al, (1 - S)^2 / G$at(t), 0)) / nrow(d)
}
bs <- sapply(grid, brier)
put("brier.grid", bs)
put("brier.integrated", sum(diff(grid) * (head(bs, -1) + tail(bs, -1)) / 2) / (max(grid) - min(grid)))
