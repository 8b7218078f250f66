# Reference fits from R for the arcfield fit layer (run by scripts/gen-fit-fixtures.sh).
#
#   Rscript scripts/reference-fits.R OUT_DIR RESULTS_CSV
#
# Reads the invented datasets written by reference-fits.py (OUT_DIR/datasets.json and CSVs) and
# writes one long CSV (dataset, method, field, index, value; index 0 = scalar, 1.. = vector
# element) with every number printed as %.17g so nothing is lost on the way to JSON.
#
# Every tool sees the whitened problem: rows of X and y multiplied by sqrt(w), w = 1/sigma^2.
#   lm       lm(yw ~ Xw - 1): coefficients, sigma, vcov, hatvalues, rstandard
#   rq       quantreg::rq(yw ~ Xw - 1, tau = 0.5, method = "br"): the exact L1 vertex
#   rlm-*    MASS::rlm(Xw, yw, psi, init = the rq coefficients, maxit = 1000, acc = 1e-12) with
#            MASS's own scale rule (median|r|/0.6745 re-estimated every iteration); the final
#            scale fit$s is recorded so the fixed-scale estimator can be compared at that scale
#   rlm-mm   MASS::rlm(method = "MM"): bisquare c = 4.685 with the scale fixed at the S-estimate;
#            the S start (lqs with the same seed) is recorded
#   pchisq   upper tail at the points of datasets/chi-square-points.csv
suppressPackageStartupMessages({ library(quantreg); library(MASS); library(jsonlite) })

args <- commandArgs(trailingOnly = TRUE)
if (length(args) != 2) stop("usage: Rscript scripts/reference-fits.R OUT_DIR RESULTS_CSV")
out_dir <- args[1]
results <- args[2]

rows <- list()
put <- function(dataset, method, field, value) {
  v <- as.vector(value)
  if (is.character(v)) txt <- v else txt <- ifelse(is.na(v), "NA", sprintf("%.17g", as.numeric(v)))
  idx <- if (length(v) == 1 && !is.matrix(value) && field %in% scalars) 0L else seq_along(v)
  rows[[length(rows) + 1]] <<- data.frame(dataset = dataset, method = method, field = field,
                                          index = idx, value = txt, stringsAsFactors = FALSE)
}
scalars <- c("objective", "scale", "sigma", "rank", "converged", "iterations", "message",
             "R", "quantreg", "MASS", "startScale")

put("_session", "versions", "R", paste(R.version$major, R.version$minor, sep = "."))
put("_session", "versions", "quantreg", as.character(packageVersion("quantreg")))
put("_session", "versions", "MASS", as.character(packageVersion("MASS")))

index <- fromJSON(file.path(out_dir, "datasets.json"))$datasets
for (k in seq_len(nrow(index))) {
  e <- index[k, ]
  d <- read.csv(file.path(out_dir, e$csv), colClasses = "numeric")
  p <- e$p
  X <- as.matrix(d[, seq_len(p), drop = FALSE])
  sw <- sqrt(d$w)
  Xw <- X * sw
  yw <- d$y * sw
  id <- e$id

  fit <- lm(yw ~ Xw - 1)
  put(id, "lm", "coefficients", unname(coef(fit)))
  put(id, "lm", "rank", fit$rank)
  if (fit$rank == p && nrow(X) > p) {
    s <- summary(fit)
    put(id, "lm", "sigma", s$sigma)
    put(id, "lm", "covariance", t(vcov(fit)))
    put(id, "lm", "hatvalues", unname(hatvalues(fit)))
    put(id, "lm", "rstandard", unname(rstandard(fit)))
  }
  if (isTRUE(e$edge)) next

  l1 <- suppressWarnings(rq(yw ~ Xw - 1, tau = 0.5, method = "br"))
  b1 <- unname(coef(l1))
  put(id, "rq", "coefficients", b1)
  put(id, "rq", "objective", sum(abs(yw - Xw %*% b1)))

  hub <- suppressWarnings(rlm(Xw, yw, psi = psi.huber, k = 1.345, init = b1, maxit = 1000, acc = 1e-12))
  put(id, "rlm-huber", "coefficients", unname(coef(hub)))
  put(id, "rlm-huber", "scale", hub$s)
  put(id, "rlm-huber", "converged", as.numeric(hub$converged))
  put(id, "rlm-huber", "iterations", length(hub$conv))

  bis <- suppressWarnings(rlm(Xw, yw, psi = psi.bisquare, c = 4.685, init = b1, maxit = 1000, acc = 1e-12))
  put(id, "rlm-bisquare", "coefficients", unname(coef(bis)))
  put(id, "rlm-bisquare", "scale", bis$s)
  put(id, "rlm-bisquare", "converged", as.numeric(bis$converged))
  put(id, "rlm-bisquare", "iterations", length(bis$conv))

  if (nrow(X) >= 10) {
    set.seed(20260 + k)
    S <- lqs(Xw, yw, intercept = FALSE, method = "S", k0 = 1.548)
    set.seed(20260 + k)
    mm <- suppressWarnings(rlm(Xw, yw, method = "MM", c = 4.685, maxit = 1000, acc = 1e-12))
    put(id, "rlm-mm", "start", unname(coef(S)))
    put(id, "rlm-mm", "startScale", S$scale[1])
    put(id, "rlm-mm", "coefficients", unname(coef(mm)))
    put(id, "rlm-mm", "scale", mm$s)
    put(id, "rlm-mm", "converged", as.numeric(mm$converged))
    put(id, "rlm-mm", "iterations", length(mm$conv))
  }
}

pts <- read.csv(file.path(out_dir, "datasets", "chi-square-points.csv"), colClasses = "numeric")
put("chisq", "pchisq", "statistic", pts$statistic)
put("chisq", "pchisq", "dof", pts$dof)
put("chisq", "pchisq", "upper", pchisq(pts$statistic, pts$dof, lower.tail = FALSE))

write.csv(do.call(rbind, rows), results, row.names = FALSE, quote = TRUE)
