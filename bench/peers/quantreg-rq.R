# Peer: exact least absolute deviations by quantreg::rq.fit (tau = 0.5) with method "br"
# (Barrodale–Roberts simplex), "fn" (Frisch–Newton interior point) or "pfn" (Portnoy–Koenker
# preprocessing around fn). Usage:
#   Rscript bench/peers/quantreg-rq.R --data FILE --method br|fn|pfn --budget S --max-repeats K --min-sample S
args_all <- commandArgs(trailingOnly = FALSE)
here <- dirname(sub("^--file=", "", args_all[grep("^--file=", args_all)]))
source(file.path(here, "dataset.R"))
args <- parse_args(c("data", "method", "budget", "max-repeats", "min-sample"))
suppressPackageStartupMessages(library(quantreg))
ds <- read_dataset(args$data)
p <- ds$header$p
X <- design(ds$x, p)
y <- ds$y
method <- args$method
if (!(method %in% c("br", "fn", "pfn"))) stop(sprintf("--method %s: expected br, fn or pfn", method))
timed <- time_fit(function() rq.fit(X, y, tau = 0.5, method = method),
                  as.numeric(args$budget), as.integer(args$`max-repeats`), as.numeric(args$`min-sample`))
fit <- timed$result
beta <- as.numeric(fit$coefficients)
emit(list(
  peer = sprintf("quantreg rq.fit %s", method),
  estimator = "least-absolute",
  n = length(y), p = p,
  seconds = as_array(timed$seconds), callsPerSample = timed$calls,
  coefficients = as_array(beta),
  objective = sum(abs(y - X %*% beta)),
  status = "ok",
  settings = sprintf("tau = 0.5, method = \"%s\", package defaults otherwise", method),
  versions = list(R = r_version(), quantreg = as.character(packageVersion("quantreg")))
))
