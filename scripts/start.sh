#!/usr/bin/env bash
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh
exec npx tsx scripts/start.ts
