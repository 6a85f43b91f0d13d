#!/usr/bin/env bash
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh --browser
exec npx tsx scripts/run-tests.ts "$@"
