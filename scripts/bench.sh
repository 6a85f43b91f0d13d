#!/usr/bin/env bash
# npm run bench: speed figures as ratios to baselines measured in the same run (tests/bench/*.bench.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh --browser
# The ingest benchmark sends its file with curl, a C client reading from disk as psql does.
if ! command -v curl >/dev/null 2>&1; then
  [ "$(id -u)" -eq 0 ] || { echo 'The ingest benchmark needs curl (apt-get install -y curl)' >&2; exit 1; }
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq curl >/dev/null
fi
exec npx tsx tests/bench/run.ts "$@"
