# Peer: least squares by R's .lm.fit (LINPACK-style Householder QR with limited pivoting, no
# formula or model-frame overhead). Usage:
#   Rscript bench/peers/lm-fit.R --data FILE --budget S --max-repeats K --min-sample S
args_all <- commandArgs(trailingOnly = FALSE)
here <- dirname(sub("^--file=", "", args_all[grep("^--file=", args_all)]))
source(file.path(here, "dataset.R"))
args <- parse_args(c("data", "budget", "max-repeats", "min-sample"))
ds <- read_dataset(args$data)
p <- ds$header$p
X <- design(ds$x, p)
y <- ds$y
timed <- time_fit(function() .lm.fit(X, y), as.numeric(args$budget), as.integer(args$`max-repeats`), as.numeric(args$`min-sample`))
beta <- as.numeric(timed$result$coefficients)
emit(list(
  peer = "R .lm.fit",
  estimator = "least-squares",
  n = length(y), p = p,
  seconds = as_array(timed$seconds), callsPerSample = timed$calls,
  coefficients = as_array(beta),
  status = "ok",
  settings = ".lm.fit(X, y), tol = 1e-7 (default)",
  versions = list(R = r_version())
))
