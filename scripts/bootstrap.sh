#!/usr/bin/env bash
# Installs node_modules when absent or older than the lock file; everything else runs in TypeScript.
set -euo pipefail
cd "$(dirname "$0")/.."
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[setup] installing npm packages (npm ci)…"
  npm ci --no-audit --no-fund --loglevel=error
fi
