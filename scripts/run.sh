#!/usr/bin/env bash
# Entry for `npm start` and `npm test`: needs nothing but node and npm.
# Installs the npm dependencies when they are missing or older than the lock
# file, then hands over to the TypeScript orchestrator (scripts/<command>.ts).
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."

command="${1:-}"
case "$command" in
  start | test) shift ;;
  *)
    echo "usage: bash scripts/run.sh start|test [options]   (normally: npm start / npm test)" >&2
    exit 2
    ;;
esac

if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[run] installing npm dependencies (npm ci)"
  npm ci --no-audit --no-fund
fi

# `node --import tsx` is what `npx tsx` runs, without two extra processes in
# between that would each relay (and duplicate) Ctrl-C.
exec node --import tsx "scripts/$command.ts" "$@"
