#!/usr/bin/env bash
# Installs what a fresh machine lacks before `npm start` / `npm test`:
# Debian packages (PostgreSQL 15 + PostGIS 3 always; GDAL, Chromium and Python for tests)
# and the npm packages from the lock file. Idempotent and quiet when nothing is missing.
set -euo pipefail
cd "$(dirname "$0")/.."

mode=${1:-${npm_lifecycle_event:-start}}
need=(postgresql-15 postgresql-15-postgis-3)
if [[ $mode == test ]]; then need+=(gdal-bin chromium python3 python3-prov python3-pip python3-setuptools python3-wheel); fi

missing=()
for pkg in "${need[@]}"; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
done
if ((${#missing[@]})); then
  echo "rillscale: installing Debian packages: ${missing[*]}"
  sudo_cmd=""; [[ $(id -u) -ne 0 ]] && sudo_cmd="sudo"
  $sudo_cmd apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo_cmd apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

# npm ci when node_modules is missing or older than the lock file.
if [[ ! -f node_modules/.package-lock.json || package-lock.json -nt node_modules/.package-lock.json ]]; then
  echo "rillscale: installing npm packages (npm ci)"
  npm ci --no-audit --no-fund --loglevel=error
fi
