#!/usr/bin/env bash
# `npm run bench`: the benchmark's peer odiff-bin is not in package.json (its lock entries for other platforms'
# binaries are not on the registry, which made `npm ci` refuse the lock), so it is installed here when missing,
# without touching package.json or the lock, then the benchmark runs.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
if [[ ! -f node_modules/odiff-bin/package.json ]]; then
  echo "Installing the benchmark peer odiff-bin 4.5.0 (not part of npm ci)…"
  npm install --no-save --no-package-lock --no-audit --no-fund odiff-bin@4.5.0
fi
exec node_modules/.bin/tsx bench/run.ts "$@"
