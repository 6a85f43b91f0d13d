#!/usr/bin/env bash
# Vite dev server with hot reload; /api is proxied to the server that `npm start` runs on :3000.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-tools.sh
if ! curl -sf http://127.0.0.1:3000/api/health >/dev/null 2>&1; then
  echo "No API on 127.0.0.1:3000 yet: run 'npm start' in another terminal for data and sign-in."
fi
exec npx vite
