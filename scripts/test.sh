#!/usr/bin/env bash
# `npm test [-- vitest args]`: the whole suite against private TEST services (own ports, data in .data/test,
# a fresh database each run), never the demo's. Builds and serves the app when the browser tests are selected.
# Prints Vitest's summary and then one plain line "N passed, N failed"; exits non-zero when a test fails.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
cd "$ROOT"

use_test_services
use_app_port 3010
export TYMPAN_BUILD_SKIP_TYPECHECK=1
export TYMPAN_WITH_CHROMIUM=1
export TYMPAN_TEST=1

RESULTS_DIR="$ROOT/test-results"
JSON="$RESULTS_DIR/vitest.json"
SUMMARY="$RESULTS_DIR/summary.txt"
RUN_DIR="$TYMPAN_DATA_DIR/run"
mkdir -p "$RESULTS_DIR" "$RUN_DIR"
rm -f "$JSON" "$SUMMARY"

ensure_node_modules
ensure_session_secret "$TYMPAN_DATA_DIR"
take_test_lock

started_services=0
app_pid=""
cleanup() {
  local status=$?
  if [[ -n "$app_pid" ]] && kill -0 "$app_pid" 2>/dev/null; then
    kill "$app_pid" 2>/dev/null || true
    wait "$app_pid" 2>/dev/null || true
  fi
  if ((started_services)); then bash scripts/services.sh stop >/dev/null || true; fi
  [[ -f "$SUMMARY" ]] || echo "0 passed, 0 failed" >"$SUMMARY"
  echo
  cat "$SUMMARY"
  exit "$status"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

[[ -f "$RUN_DIR/mysqld.pid" ]] && kill -0 "$(cat "$RUN_DIR/mysqld.pid")" 2>/dev/null || started_services=1
bash scripts/services.sh start
bash scripts/services.sh reset-db
node_modules/.bin/tsx db/migrate.ts

# The browser tests need the built app; build only when they are part of this run.
wants_browser=1
if (($# > 0)); then
  wants_browser=0
  for arg in "$@"; do [[ "$arg" == *e2e* ]] && wants_browser=1; done
fi
if ((wants_browser)); then
  if [[ "${TYMPAN_SKIP_BUILD:-0}" != 1 || ! -f "$NEXT_DIST_DIR/BUILD_ID" ]]; then
    echo "Building the app for the browser tests…"
    node node_modules/next/dist/bin/next build >"$RESULTS_DIR/next-build.log" 2>&1 ||
      { tail -40 "$RESULTS_DIR/next-build.log"; echo "next build failed; see test-results/next-build.log" >&2; exit 1; }
  fi
  node node_modules/next/dist/bin/next start -H 127.0.0.1 -p "$APP_PORT" >"$RESULTS_DIR/next-start.log" 2>&1 &
  app_pid=$!
  for _ in $(seq 1 300); do (exec 3<>/dev/tcp/127.0.0.1/$APP_PORT) 2>/dev/null && break; sleep 0.2; done
  export TYMPAN_APP_READY=1
fi

status=0
node_modules/.bin/vitest run --reporter=default --reporter=json --outputFile.json="$JSON" "$@" || status=$?

if [[ -f "$JSON" ]]; then
  # A file that fails to load has no failing test in it but must still count as a failure.
  node -e '
    const r = JSON.parse(require("fs").readFileSync(process.argv[1], "utf8"));
    const brokenFiles = (r.testResults || []).filter(
      (file) => file.status === "failed" && !file.assertionResults.some((test) => test.status === "failed"),
    ).length;
    console.log(`${r.numPassedTests} passed, ${r.numFailedTests + brokenFiles} failed`);
  ' "$JSON" >"$SUMMARY"
fi
exit "$status"
