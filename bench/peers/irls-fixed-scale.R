# Correctness reference for arcfield's Huber and Tukey fits, with the same rule (design.md):
#   start  = the exact L1 fit (quantreg rq.fit, "br" up to n = 5000; above, "pfn" followed by the
#            vertex through the p rows of smallest |r|, kept when its Σ|r| is not larger, because
#            pfn's interior point stops ~1e-10 relative short of the vertex and the scale would
#            inherit that wobble);
#   scale  = 1/qnorm(3/4) · median|r − median r| of the start's residuals, then held fixed
#            (or the value given with --scale, to check that a result is the M-estimate at the
#            scale it reports);
#   IRLS   = weights from MASS's psi.huber (k = 1.345) / psi.bisquare (c = 4.685), each step an
#            exact weighted least squares by lm.wfit (Householder QR), iterated to a fixed point:
#            until |Δβⱼ| ≤ 1e-10 (|βⱼ| + s/max|Xⱼ|) for every j, or 500 steps. The steps shrink
#            linearly (factor ~0.13 per step here) down to a rounding floor of ~1e-11 in this
#            measure (QR on the uncentred [1, x, x²]), so 1e-10 is the tightest test that always
#            ends, and leaves ~1e-11 of error: 1000× below the 1e-8 the comparison asks for.
# An independent implementation in another language and linear-algebra library; not a speed peer.
# Usage: Rscript bench/peers/irls-fixed-scale.R --data FILE --psi huber|bisquare [--scale S]
#        --budget S --max-repeats K --min-sample S
args_all <- commandArgs(trailingOnly = FALSE)
here <- dirname(sub("^--file=", "", args_all[grep("^--file=", args_all)]))
source(file.path(here, "dataset.R"))
args <- parse_args(c("data", "psi", "budget", "max-repeats", "min-sample"))
suppressPackageStartupMessages({ library(quantreg); library(MASS) })
ds <- read_dataset(args$data)
p <- ds$header$p
X <- design(ds$x, p)
y <- ds$y
n <- length(y)
psi <- switch(args$psi,
  huber = function(u) psi.huber(u, k = 1.345),
  bisquare = function(u) psi.bisquare(u, c = 4.685),
  stop(sprintf("--psi %s: expected huber or bisquare", args$psi)))
MAX_STEPS <- 500
STEP_TOL <- 1e-10
col_max <- apply(abs(X), 2, max)

fit_once <- function() {
  start <- as.numeric(rq.fit(X, y, tau = 0.5, method = if (n > 5000) "pfn" else "br")$coefficients)
  if (n > 5000) {
    near <- order(abs(y - X %*% start))[seq_len(p)]
    vertex <- tryCatch(as.numeric(solve(X[near, , drop = FALSE], y[near])), error = function(e) NULL)
    if (!is.null(vertex) && sum(abs(y - X %*% vertex)) <= sum(abs(y - X %*% start))) start <- vertex
  }
  r <- as.numeric(y - X %*% start)
  s <- if (!is.null(args$scale)) as.numeric(args$scale) else mad(r, center = median(r), constant = 1 / qnorm(0.75))
  beta <- start
  converged <- FALSE
  steps <- 0
  for (it in seq_len(MAX_STEPS)) {
    steps <- it
    u <- as.numeric(y - X %*% beta) / s
    new <- as.numeric(lm.wfit(X, y, psi(u))$coefficients)
    done <- all(abs(new - beta) <= STEP_TOL * (abs(new) + s / col_max))
    beta <- new
    if (done) { converged <- TRUE; break }
  }
  list(beta = beta, start = start, s = s, steps = steps, converged = converged)
}
timed <- time_fit(fit_once, as.numeric(args$budget), as.integer(args$`max-repeats`), as.numeric(args$`min-sample`))
f <- timed$result
emit(list(
  peer = sprintf("R IRLS fixed scale %s", args$psi),
  estimator = if (args$psi == "huber") "huber" else "tukey",
  n = n, p = p,
  seconds = as_array(timed$seconds), callsPerSample = timed$calls,
  coefficients = as_array(f$beta), start = as_array(f$start),
  scale = f$s, iterations = f$steps, converged = f$converged,
  status = if (f$converged) "ok" else "not-converged",
  settings = sprintf("L1 start (rq.fit %s), scale %s, psi.%s, lm.wfit steps to 1e-10",
                     if (n > 5000) "pfn" else "br",
                     if (!is.null(args$scale)) sprintf("given %.17g", as.numeric(args$scale)) else "1/qnorm(0.75)*MAD of the start (fixed)",
                     args$psi),
  versions = list(R = r_version(), quantreg = as.character(packageVersion("quantreg")), MASS = as.character(packageVersion("MASS")))
))
