# Shared by scripts/*.sh: repository root, .env loading (never overriding what the caller set), helpers.
export NEXT_TELEMETRY_DISABLED=1
# The product's owners fix Node.js 20; the AWS SDK's notice about its future Node 22 floor repeats in every process
# and nobody running Tympan can act on it (the locked SDK version runs on 20).
export AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED="${AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED:-true}"
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"

load_dotenv() {
  local file="${1:-$ROOT/.env}" line key
  [[ -f "$file" ]] || return 0
  while IFS= read -r line || [[ -n "$line" ]]; do
    [[ "$line" =~ ^[[:space:]]*# || ! "$line" =~ = ]] && continue
    key="${line%%=*}"; key="${key// /}"
    [[ "$key" =~ ^[A-Za-z_][A-Za-z0-9_]*$ ]] || continue
    if [[ -z "${!key+x}" ]]; then
      local value="${line#*=}"
      value="${value%\"}"; value="${value#\"}"; value="${value%\'}"; value="${value#\'}"
      export "$key=$value"
    fi
  done <"$file"
}

# Install node_modules when missing (a fresh checkout), from the lock file when there is one.
ensure_node_modules() {
  if [[ ! -d "$ROOT/node_modules/next" ]]; then
    echo "Installing npm dependencies…"
    # npm ci: exactly the locked versions. (The benchmark's peer odiff-bin is installed by npm run bench.)
    (cd "$ROOT" && npm ci --no-audit --no-fund)
  fi
}

# next start runs as production and needs NEXTAUTH_SECRET (lib/env.ts). When the caller gave none, use one kept in
# the data directory (made once, readable by this user only), so sessions survive a restart of the demo.
ensure_session_secret() {
  [[ -n "${NEXTAUTH_SECRET:-}" ]] && return 0
  local dir="$1" file="$1/session-secret"
  mkdir -p "$dir"
  if [[ ! -s "$file" ]]; then
    (umask 077 && node -e 'process.stdout.write(require("crypto").randomBytes(32).toString("base64url"))' >"$file")
  fi
  NEXTAUTH_SECRET="$(cat "$file")"
  export NEXTAUTH_SECRET
}
