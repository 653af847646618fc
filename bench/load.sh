#!/usr/bin/env bash
# `npm run bench:load`: the test services (scripts/env.sh, as `npm test` uses them), a fresh migrated database,
# the test build (made when missing), and bench/load.ts against `next start` on loopback.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/../scripts/env.sh"
cd "$ROOT"
use_test_services
use_app_port 3090
ensure_node_modules
ensure_session_secret "$TYMPAN_DATA_DIR"
take_test_lock
started_services=0
[[ -f "$TYMPAN_DATA_DIR/run/mysqld.pid" ]] && kill -0 "$(cat "$TYMPAN_DATA_DIR/run/mysqld.pid")" 2>/dev/null || started_services=1
cleanup() { if ((started_services)); then bash scripts/services.sh stop >/dev/null || true; fi; }
trap cleanup EXIT
bash scripts/services.sh start >/dev/null
bash scripts/services.sh reset-db >/dev/null
node_modules/.bin/tsx db/migrate.ts >/dev/null
[[ -f "$NEXT_DIST_DIR/BUILD_ID" ]] || node node_modules/next/dist/bin/next build >/dev/null
BENCH_PORT="$APP_PORT" node_modules/.bin/tsx bench/load.ts
