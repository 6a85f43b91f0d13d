#!/usr/bin/env bash
# Installs what a fresh Debian machine lacks: npm packages, the PostgreSQL server and (for tests) Chromium.
# Usage: scripts/ensure-tools.sh [--browser]
set -euo pipefail
cd "$(dirname "$0")/.."

apt_install() {
  if [ "$(id -u)" -ne 0 ]; then
    echo "Missing system packages: $*. Install them (as root: apt-get install -y $*) and run again." >&2
    exit 1
  fi
  echo "Installing $* from Debian's packages…"
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null
}

if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "Installing npm dependencies…"
  npm ci --no-audit --no-fund --loglevel=error
fi

if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 && ! command -v initdb >/dev/null 2>&1; then
  apt_install postgresql
fi

if [ "${1:-}" = "--browser" ] && [ ! -x /usr/bin/chromium ]; then
  apt_install chromium
fi
