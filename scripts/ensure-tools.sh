#!/usr/bin/env bash
# Installs what a fresh Debian machine lacks: npm packages, the PostgreSQL server and (for tests) Chromium, poppler-utils and unzip.
# Usage: scripts/ensure-tools.sh [--browser]
# Ends with one progress line in the shape of npm start's (scripts/lib/progress.ts).
set -euo pipefail
cd "$(dirname "$0")/.."

step() { printf '  %s %-11s %s\n' "$1" "$2" "$3"; }

apt_install() {
  if [ "$(id -u)" -ne 0 ]; then
    echo "Missing system packages: $*. Install them (as root: apt-get install -y $*) and run again." >&2
    exit 1
  fi
  step … packages "installing $* from Debian's packages"
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null
}

# npm keeps what it installed in node_modules/.package-lock.json. Installed means every package of
# package-lock.json is there in its version, optional ones for other platforms aside. The contents are
# compared, not the times: a checkout or merge rewrites package-lock.json without changing it.
installed() {
  node -e '
    const { readFileSync } = require("node:fs");
    const read = (f) => JSON.parse(readFileSync(f, "utf8")).packages;
    const want = read("package-lock.json");
    const have = read("node_modules/.package-lock.json");
    const missing = Object.entries(want).filter(([path, p]) => path !== "" && !p.optional && have[path]?.version !== p.version);
    process.exit(missing.length ? 1 : 0);
  ' 2>/dev/null
}

npm_state="npm packages as in package-lock.json"
if [ ! -d node_modules ] || ! installed; then
  step … packages "installing npm packages (npm ci)"
  npm ci --no-audit --no-fund --loglevel=error
  npm_state="npm packages installed from package-lock.json"
fi

if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 && ! command -v initdb >/dev/null 2>&1; then
  apt_install postgresql
fi

if [ "${1:-}" = "--browser" ] && [ ! -x /usr/bin/chromium ]; then
  apt_install chromium
fi

# The report tests read the PDFs with poppler's pdftotext and the audit packs with Info-ZIP's unzip: readers
# independent of the writers.
if [ "${1:-}" = "--browser" ] && { ! command -v pdftotext >/dev/null 2>&1 || ! command -v unzip >/dev/null 2>&1; }; then
  apt_install poppler-utils unzip
fi

postgres=$(ls -d /usr/lib/postgresql/*/bin/initdb 2>/dev/null | sed 's#/usr/lib/postgresql/\([^/]*\)/.*#PostgreSQL \1#' | sort -V | tail -n 1)
extra=""
[ "${1:-}" = "--browser" ] && extra="; Chromium; poppler-utils; unzip"
step ✓ packages "$npm_state; ${postgres:-PostgreSQL}${extra}"
