#!/usr/bin/env bash
# `npm run demo` (or `bash scripts/demo.sh` on a fresh checkout): everything needed to try Tympan on one machine.
# Installs what is missing (npm packages; MariaDB and Redis from Debian when run as root), starts the private
# services, migrates, seeds the invented demo plant, builds, then serves the app and the worker in the foreground.
# Ctrl-C stops the app and the worker; the services keep running (`npm run services -- stop` ends them).
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
cd "$ROOT"
load_dotenv
ensure_node_modules
ensure_session_secret "${TYMPAN_DATA_DIR:-$ROOT/.data}"

bash scripts/services.sh start
node_modules/.bin/tsx db/migrate.ts
node_modules/.bin/tsx db/seed.ts

echo "Building the app…"
node node_modules/next/dist/bin/next build

APP_URL="${APP_URL:-http://127.0.0.1:3000}"
APP_HOST="$(node -e 'console.log(new URL(process.argv[1]).hostname)' "$APP_URL")"
APP_PORT="$(node -e 'const u = new URL(process.argv[1]); console.log(u.port || (u.protocol === "https:" ? 443 : 80))' "$APP_URL")"

pids=()
stop_all() {
  trap - INT TERM EXIT
  echo
  echo "Stopping the app and the worker…"
  for pid in "${pids[@]}"; do kill "$pid" 2>/dev/null || true; done
  for pid in "${pids[@]}"; do wait "$pid" 2>/dev/null || true; done
  echo "Stopped. The services are still running; stop them with: npm run services -- stop"
}
trap stop_all EXIT
trap 'exit 130' INT TERM

# Started as `node …/next start` so the recorded pid is the server itself, not a wrapper.
node node_modules/next/dist/bin/next start -H "$APP_HOST" -p "$APP_PORT" &
pids+=($!)

if [[ -f worker/index.ts ]]; then
  node_modules/.bin/tsx worker/index.ts &
  pids+=($!)
else
  echo "worker/index.ts is not there yet: running without the inspection worker."
fi

for _ in $(seq 1 150); do (exec 3<>"/dev/tcp/$APP_HOST/$APP_PORT") 2>/dev/null && break; sleep 0.2; done

# --- demo-run hook: seeds an already inspected press run once the worker is up (scripts/demo-run.ts) ---
if [[ -f scripts/demo-run.ts ]]; then node_modules/.bin/tsx scripts/demo-run.ts; fi
# --- end of demo-run hook ---

cat <<MSG

Tympan is running at $APP_URL
Sign in as, for example, admin@wrenfold.example with the password tympan-demo
(all demo accounts are listed in README.md). Invitation e-mails arrive at http://127.0.0.1:${MAILDEV_WEB_PORT:-1080}/index.html
Press Ctrl-C to stop.
MSG
# The demo lasts as long as the app; a worker that stops prints its own error and the app stays up.
wait "${pids[0]}" || true
