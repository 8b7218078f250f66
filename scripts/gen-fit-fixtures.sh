#!/usr/bin/env bash
# Regenerates the fit layer's reference fixtures in test/fixtures/fit/ from tools outside the
# project: numpy / scipy (HiGHS) / statsmodels (Debian python3-*, run with /usr/bin/python3, not a
# pyenv python) and R (r-cran-quantreg, r-cran-mass). The datasets are invented and seeded, so a
# rerun reproduces the same files unless a tool version changes. Commit the result.
#
#   bash scripts/gen-fit-fixtures.sh
set -euo pipefail
cd "$(dirname "$0")/.."
out=test/fixtures/fit
mkdir -p "$out"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

/usr/bin/python3 scripts/reference-fits.py datasets "$out"
Rscript scripts/reference-fits.R "$out" "$tmp/r-results.csv"
/usr/bin/python3 scripts/reference-fits.py fits "$out" "$tmp/r-results.csv"
echo "fit fixtures written to $out:" && ls "$out"
