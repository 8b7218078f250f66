# Shared helpers for the R peers: read the arcfield bench dataset, build the design matrix, time a
# fit in-process by the harness's protocol, and print one JSON line (numbers with 17 significant
# digits, so coefficients survive the trip exactly).
#
# File layout (see bench/harness/dataset-file.ts): 8-byte magic "ARCBNCH1", uint32 LE header length
# H, 4 zero bytes, H bytes of JSON header, then n float64 LE x values and n float64 LE y values.
#
# Timing protocol (identical in bench/harness/timing.ts and bench/peers/dataset.py): one first call;
# if it took more than LONG_RUN_SECONDS it is the only sample; otherwise warm-up calls until
# WARMUP_SECONDS have been spent and MIN_WARMUP_CALLS made (the first included), or until
# WARMUP_CAP_SECONDS, whichever comes first (at least one after the first; the reason is in timing.ts),
# c = the fastest warm-up call, k = ceil(min_sample / c) calls per sample, and
# clamp(floor(budget / (c * k)), MIN_REPEATS, max_repeats) samples.

LONG_RUN_SECONDS <- 10  # keep equal to bench/harness/timing.ts
MIN_REPEATS <- 3
WARMUP_SECONDS <- 1  # keep equal to bench/harness/timing.ts
MIN_WARMUP_CALLS <- 20  # keep equal to bench/harness/timing.ts
WARMUP_CAP_SECONDS <- 6  # keep equal to bench/harness/timing.ts

read_dataset <- function(path) {
  con <- file(path, "rb")
  on.exit(close(con))
  magic <- rawToChar(readBin(con, "raw", 8))
  if (magic != "ARCBNCH1") stop(sprintf("%s: magic %s, expected ARCBNCH1", path, magic))
  len <- readBin(con, "integer", 1, size = 4, endian = "little")
  invisible(readBin(con, "raw", 4))
  header <- jsonlite::fromJSON(rawToChar(readBin(con, "raw", len)))
  n <- header$n
  x <- readBin(con, "double", n, size = 8, endian = "little")
  y <- readBin(con, "double", n, size = 8, endian = "little")
  if (length(x) != n || length(y) != n) stop(sprintf("%s: truncated", path))
  list(header = header, x = x, y = y)
}

design <- function(x, p) {
  if (p == 3) cbind(1, x, x * x) else cbind(1, x)
}

now <- function() as.numeric(Sys.time())

time_fit <- function(fit, budget, max_repeats, min_sample) {
  t0 <- now()
  result <- fit()
  first <- now() - t0
  if (first > LONG_RUN_SECONDS) return(list(result = result, seconds = first, calls = 1))
  spent <- first
  fastest <- first
  calls <- 1
  repeat {
    t0 <- now()
    result <- fit()
    d <- now() - t0
    spent <- spent + d
    fastest <- min(fastest, d)
    calls <- calls + 1
    if ((spent >= WARMUP_SECONDS && calls >= MIN_WARMUP_CALLS) || spent >= WARMUP_CAP_SECONDS) break
  }
  calibration <- max(fastest, 1e-9)
  k <- max(1, ceiling(min_sample / calibration))
  repeats <- max(min(MIN_REPEATS, max_repeats), min(max_repeats, floor(budget / (calibration * k))))
  samples <- numeric(repeats)
  for (r in seq_len(repeats)) {
    t0 <- now()
    for (i in seq_len(k)) result <- fit()
    samples[r] <- (now() - t0) / k
  }
  list(result = result, seconds = samples, calls = k)
}

parse_args <- function(required) {
  argv <- commandArgs(trailingOnly = TRUE)
  out <- list()
  i <- 1
  while (i <= length(argv)) {
    key <- argv[[i]]
    if (!startsWith(key, "--")) stop(sprintf("unexpected argument %s", key))
    out[[substring(key, 3)]] <- if (i + 1 <= length(argv)) argv[[i + 1]] else ""
    i <- i + 2
  }
  missing <- setdiff(required, names(out))
  if (length(missing) > 0) stop(sprintf("missing --%s", paste(missing, collapse = ", --")))
  out
}

json_value <- function(v) {
  if (is.null(v)) return("null")
  if (is.list(v)) {
    keys <- names(v)
    parts <- vapply(seq_along(v), function(i) sprintf("%s:%s", json_string(keys[[i]]), json_value(v[[i]])), "")
    return(sprintf("{%s}", paste(parts, collapse = ",")))
  }
  if (is.character(v)) {
    if (length(v) == 1) return(json_string(v))
    return(sprintf("[%s]", paste(vapply(v, json_string, ""), collapse = ",")))
  }
  if (is.logical(v)) {
    s <- ifelse(is.na(v), "null", ifelse(v, "true", "false"))
    return(if (length(v) == 1) s else sprintf("[%s]", paste(s, collapse = ",")))
  }
  s <- ifelse(is.finite(v), sprintf("%.17g", as.numeric(v)), "null")
  if (length(v) == 1 && is.null(attr(v, "as_array"))) s else sprintf("[%s]", paste(s, collapse = ","))
}

json_string <- function(s) {
  s <- gsub("\\\\", "\\\\\\\\", s)
  s <- gsub("\"", "\\\\\"", s)
  s <- gsub("\n", "\\\\n", s)
  sprintf("\"%s\"", s)
}

# Marks a numeric vector to be written as a JSON array even when it has one element.
as_array <- function(v) {
  attr(v, "as_array") <- TRUE
  v
}

emit <- function(record) {
  cat(json_value(record), "\n", sep = "")
}

r_version <- function() sprintf("%s.%s", R.version$major, R.version$minor)
