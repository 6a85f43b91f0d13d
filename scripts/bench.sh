#!/usr/bin/env bash
# npm run bench: speed figures as ratios to baselines measured in the same run (tests/bench/*.bench.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh --browser
exec npx tsx tests/bench/run.ts "$@"
