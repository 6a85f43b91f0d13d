#!/usr/bin/env bash
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh
# Node itself, with tsx's loader: one process, so Ctrl-C reaches start.ts and its clean-up directly.
exec node --import tsx scripts/start.ts
