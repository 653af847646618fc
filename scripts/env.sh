# Shared by scripts/*.sh: repository root, .env loading (never overriding what the caller set), helpers.
export NEXT_TELEMETRY_DISABLED=1
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
    # npm install, not npm ci: npm ci refuses this lock because it lacks entries for odiff-bin's optional
    # packages of other platforms, which the registry does not have; npm install keeps the locked versions.
    (cd "$ROOT" && npm install --no-audit --no-fund)
  fi
}
