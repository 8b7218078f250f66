#!/usr/bin/env bash
# Installs the Debian packages the tests need, skipping those already present:
# chromium (browser tests) and postgresql (database tests). Needs root (CI and dev machines here run as root).
set -euo pipefail
need=()
command -v /usr/bin/chromium >/dev/null 2>&1 || need+=(chromium)
ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 || need+=(postgresql)
if [ ${#need[@]} -eq 0 ]; then
  echo "system packages: chromium and postgresql present"
  exit 0
fi
echo "system packages: installing ${need[*]}"
export DEBIAN_FRONTEND=noninteractive
SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq "${need[@]}" >/dev/null
