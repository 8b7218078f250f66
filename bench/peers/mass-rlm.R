# Peer: M-estimation by MASS::rlm with psi.huber (k = 1.345) or psi.bisquare (c = 4.685), least
# squares start (the default init = "ls"), scale re-estimated at every iteration as
# median(|r|)/0.6745 (the default scale.est = "MAD"). MASS stops when the relative change of the
# residuals falls below acc (default 1e-4, i.e. about 1e-6 relative in the coefficients here), so the
# correctness comparison runs it again with --acc 1e-13 --maxit 1000. Usage:
#   Rscript bench/peers/mass-rlm.R --data FILE --psi huber|bisquare --acc A --maxit M --budget S --max-repeats K --min-sample S
args_all <- commandArgs(trailingOnly = FALSE)
here <- dirname(sub("^--file=", "", args_all[grep("^--file=", args_all)]))
source(file.path(here, "dataset.R"))
args <- parse_args(c("data", "psi", "acc", "maxit", "budget", "max-repeats", "min-sample"))
suppressPackageStartupMessages(library(MASS))
ds <- read_dataset(args$data)
p <- ds$header$p
X <- design(ds$x, p)
y <- ds$y
acc <- as.numeric(args$acc)
maxit <- as.integer(args$maxit)
fit_once <- switch(args$psi,
  huber = function() rlm(X, y, psi = psi.huber, k = 1.345, acc = acc, maxit = maxit),
  bisquare = function() rlm(X, y, psi = psi.bisquare, c = 4.685, acc = acc, maxit = maxit),
  stop(sprintf("--psi %s: expected huber or bisquare", args$psi)))
timed <- time_fit(fit_once, as.numeric(args$budget), as.integer(args$`max-repeats`), as.numeric(args$`min-sample`))
fit <- timed$result
emit(list(
  peer = sprintf("MASS rlm %s%s", args$psi, if (acc < 1e-4) " (tight acc)" else ""),
  estimator = if (args$psi == "huber") "huber" else "tukey",
  n = length(y), p = p,
  seconds = as_array(timed$seconds), callsPerSample = timed$calls,
  coefficients = as_array(as.numeric(fit$coefficients)),
  scale = fit$s,
  iterations = length(fit$conv),
  converged = isTRUE(fit$converged),
  status = if (isTRUE(fit$converged)) "ok" else "not-converged",
  settings = sprintf("psi.%s %s, init = \"ls\", scale.est = \"MAD\" (median|r|/0.6745 each iteration), acc = %g, maxit = %d",
                     args$psi, if (args$psi == "huber") "k = 1.345" else "c = 4.685", acc, maxit),
  versions = list(R = r_version(), MASS = as.character(packageVersion("MASS")))
))
