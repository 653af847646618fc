#!/usr/bin/env bash
# Private local services for Tympan: MariaDB, Redis, s3rver (S3 fake), maildev (SMTP fake + web inbox).
#   bash scripts/services.sh start|stop|status|install|reset-db
# Every port and credential comes from DATABASE_URL, REDIS_URL, S3_ENDPOINT, S3_BUCKET, SMTP_URL, MAILDEV_WEB_PORT
# (defaults in lib/env.ts need no .env). Data lives in TYMPAN_DATA_DIR (default .data), never in the system's
# MariaDB or Redis: their own datadir, socket, pid file and loopback port. A service whose URL points at another
# host is left alone (it is someone else's to run).
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
load_dotenv

DATA_DIR="${TYMPAN_DATA_DIR:-$ROOT/.data}"
[[ "$DATA_DIR" = /* ]] || DATA_DIR="$ROOT/$DATA_DIR"
RUN_DIR="$DATA_DIR/run"
WITH_CHROMIUM="${TYMPAN_WITH_CHROMIUM:-0}"

config() {
  ensure_node_modules
  eval "$(cd "$ROOT" && node_modules/.bin/tsx scripts/service-config.ts)"
}

port_open() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

wait_until() { # description, seconds, command…
  local what="$1" seconds="$2"; shift 2
  local i
  for ((i = 0; i < seconds * 10; i++)); do
    if "$@" >/dev/null 2>&1; then return 0; fi
    sleep 0.1
  done
  echo "$what did not answer within ${seconds}s; see the logs in $RUN_DIR." >&2
  return 1
}

alive() { [[ -f "$1" ]] && kill -0 "$(cat "$1")" 2>/dev/null; }

# --- Debian packages ---------------------------------------------------------------------------------------
install_packages() {
  local missing=()
  command -v mariadbd >/dev/null 2>&1 || [[ -x /usr/sbin/mariadbd ]] || missing+=(mariadb-server)
  command -v redis-server >/dev/null 2>&1 || missing+=(redis-server)
  if [[ "$WITH_CHROMIUM" = 1 ]] && [[ ! -x /usr/bin/chromium ]]; then missing+=(chromium); fi
  # Tests and the benchmark print press-sim sheets with Ghostscript (a renderer other than the engine's pdf.js).
  if [[ "$WITH_CHROMIUM" = 1 ]] && ! command -v gs >/dev/null 2>&1; then missing+=(ghostscript); fi
  ((${#missing[@]} == 0)) && return 0
  local line="apt-get -o DPkg::Lock::Timeout=300 install -y --no-install-recommends ${missing[*]}"
  if [[ "$(id -u)" != 0 ]]; then
    echo "Missing Debian packages: ${missing[*]}. Install them as root, then run this again:" >&2
    echo "  sudo apt-get -o DPkg::Lock::Timeout=300 update && sudo $line" >&2
    exit 1
  fi
  echo "Installing Debian packages: ${missing[*]}"
  # Keep the packages' own system services from starting: Tympan runs private instances.
  local policy=/usr/sbin/policy-rc.d added_policy=0
  if [[ ! -e "$policy" ]]; then
    printf '#!/bin/sh\nexit 101\n' >"$policy" && chmod +x "$policy" && added_policy=1
  fi
  local status=0
  { DEBIAN_FRONTEND=noninteractive apt-get -o DPkg::Lock::Timeout=300 update -qq &&
    DEBIAN_FRONTEND=noninteractive $line; } || status=$?
  ((added_policy)) && rm -f "$policy"
  ((status == 0)) || { echo "apt-get failed (exit $status)." >&2; exit "$status"; }
}

# --- MariaDB -----------------------------------------------------------------------------------------------
MARIADB_DIR() { echo "$DATA_DIR/mariadb"; }
sql_quote() { printf "%s" "${1//\'/\'\'}"; }
root_sql() { mariadb --no-defaults --socket="$RUN_DIR/mysqld.sock" -uroot -e "$1"; }
app_sql() { MYSQL_PWD="$DB_PASSWORD" mariadb --no-defaults -h127.0.0.1 -P"$DB_PORT" -u"$DB_USER" -e "$1"; }
create_db_sql() { echo "CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;"; }

start_mariadb() {
  [[ "$DB_LOCAL" = 1 ]] || { echo "MariaDB: $DB_HOST is not local, not starting one."; return 0; }
  local datadir; datadir="$(MARIADB_DIR)"
  if ! alive "$RUN_DIR/mysqld.pid"; then
    if port_open "$DB_PORT"; then
      # Started some other way (by hand, or another checkout): use it if our credentials work there.
      if app_sql "$(create_db_sql)" 2>/dev/null; then
        echo "MariaDB   127.0.0.1:$DB_PORT  (already running, not managed here) database $DB_NAME"
        return 0
      fi
      echo "MariaDB: port $DB_PORT is taken by a server that refuses user $DB_USER; choose another port in DATABASE_URL." >&2
      exit 1
    fi
    if [[ ! -d "$datadir/mysql" ]]; then
      mkdir -p "$datadir"
      mariadb-install-db --no-defaults --user="$(id -un)" --datadir="$datadir" \
        --auth-root-authentication-method=normal --skip-test-db >"$RUN_DIR/mariadb-install.log" 2>&1 ||
        { echo "mariadb-install-db failed; see $RUN_DIR/mariadb-install.log" >&2; exit 1; }
    fi
    /usr/sbin/mariadbd --no-defaults --user="$(id -un)" --datadir="$datadir" \
      --socket="$RUN_DIR/mysqld.sock" --pid-file="$RUN_DIR/mysqld.pid" \
      --bind-address=127.0.0.1 --port="$DB_PORT" --skip-name-resolve --log-error="$RUN_DIR/mysqld.err" \
      --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci --default-time-zone=+00:00 \
      --innodb-flush-log-at-trx-commit=2 --skip-log-bin >/dev/null 2>&1 &
    wait_until "MariaDB" 60 mariadb-admin --no-defaults --socket="$RUN_DIR/mysqld.sock" -uroot ping
  fi
  local name user password
  name="$DB_NAME"; user="$(sql_quote "$DB_USER")"; password="$(sql_quote "$DB_PASSWORD")"
  root_sql "$(create_db_sql)
    CREATE USER IF NOT EXISTS '$user'@'127.0.0.1' IDENTIFIED BY '$password';
    CREATE USER IF NOT EXISTS '$user'@'localhost' IDENTIFIED BY '$password';
    GRANT ALL PRIVILEGES ON \`$name%\`.* TO '$user'@'127.0.0.1';
    GRANT ALL PRIVILEGES ON \`$name%\`.* TO '$user'@'localhost';"
  echo "MariaDB   127.0.0.1:$DB_PORT  database $DB_NAME, user $DB_USER"
}

# Drop and re-create the app database (tests start from an empty one). The app user may do this itself: it holds
# every privilege on databases named after DATABASE_URL's.
reset_db() {
  [[ "$DB_LOCAL" = 1 ]] || { echo "Refusing to reset a database on $DB_HOST." >&2; exit 1; }
  app_sql "DROP DATABASE IF EXISTS \`$DB_NAME\`; $(create_db_sql)"
  echo "MariaDB   database $DB_NAME is empty"
}

stop_mariadb() {
  alive "$RUN_DIR/mysqld.pid" || return 0
  mariadb-admin --no-defaults --socket="$RUN_DIR/mysqld.sock" -uroot shutdown >/dev/null 2>&1 || true
  # shutdown returns before the server has gone: wait for the pid file to disappear.
  wait_until "MariaDB shutdown" 60 test ! -e "$RUN_DIR/mysqld.pid" || kill "$(cat "$RUN_DIR/mysqld.pid")"
}

# --- Redis -------------------------------------------------------------------------------------------------
redis_cli() { redis-cli -h 127.0.0.1 -p "$REDIS_PORT" ${REDIS_PASSWORD:+--no-auth-warning -a "$REDIS_PASSWORD"} "$@"; }

start_redis() {
  [[ "$REDIS_LOCAL" = 1 ]] || { echo "Redis: not local, not starting one."; return 0; }
  if ! alive "$RUN_DIR/redis.pid"; then
    if port_open "$REDIS_PORT"; then
      redis_cli ping >/dev/null 2>&1 || { echo "Redis: port $REDIS_PORT is taken by something else; choose another in REDIS_URL." >&2; exit 1; }
      echo "Redis     127.0.0.1:$REDIS_PORT  (already running, not managed here)"
      return 0
    fi
    mkdir -p "$DATA_DIR/redis"
    # BullMQ needs noeviction; nothing is persisted (jobs are re-queued from the database).
    redis-server --bind 127.0.0.1 --port "$REDIS_PORT" --save '' --appendonly no --dir "$DATA_DIR/redis" \
      --maxmemory-policy noeviction --daemonize yes --pidfile "$RUN_DIR/redis.pid" \
      --logfile "$RUN_DIR/redis.log" ${REDIS_PASSWORD:+--requirepass "$REDIS_PASSWORD"}
    wait_until "Redis" 30 redis_cli ping
  fi
  echo "Redis     127.0.0.1:$REDIS_PORT"
}

stop_redis() {
  alive "$RUN_DIR/redis.pid" || return 0
  redis_cli shutdown nosave >/dev/null 2>&1 || kill "$(cat "$RUN_DIR/redis.pid")" || true
  wait_until "Redis shutdown" 30 test ! -e "$RUN_DIR/redis.pid" || rm -f "$RUN_DIR/redis.pid"
}

# --- node services (s3rver, maildev) ------------------------------------------------------------------------
start_node_service() { # name, port, command…
  local name="$1" port="$2"; shift 2
  if ! alive "$RUN_DIR/$name.pid"; then
    if port_open "$port"; then
      echo "$name: port $port is already answering; using that (not managed here)."
      return 0
    fi
    (cd "$ROOT" && exec "$@" >"$RUN_DIR/$name.log" 2>&1) &
    echo $! >"$RUN_DIR/$name.pid"
    wait_until "$name" 30 port_open "$port"
  fi
}

stop_node_service() {
  local pidfile="$RUN_DIR/$1.pid"
  if alive "$pidfile"; then
    kill "$(cat "$pidfile")" 2>/dev/null || true
    wait_until "$1 shutdown" 20 bash -c "! kill -0 $(cat "$pidfile") 2>/dev/null" || kill -9 "$(cat "$pidfile")" || true
  fi
  rm -f "$pidfile"
}

start_s3() {
  [[ "$S3_LOCAL" = 1 ]] || { echo "S3: not local, not starting s3rver."; return 0; }
  mkdir -p "$DATA_DIR/s3"
  start_node_service s3rver "$S3_PORT" node node_modules/s3rver/bin/s3rver.js -d "$DATA_DIR/s3" \
    -a 127.0.0.1 -p "$S3_PORT" --no-vhost-buckets --silent --configure-bucket "$S3_BUCKET"
  # --configure-bucket only acts when s3rver starts; make sure the bucket exists when it was already running.
  (cd "$ROOT" && node --no-warnings -e '
    const { S3Client, CreateBucketCommand } = require("@aws-sdk/client-s3");
    const [endpoint, bucket, region, id, secret] = process.argv.slice(1);
    const client = new S3Client({ endpoint, region, forcePathStyle: true, credentials: { accessKeyId: id, secretAccessKey: secret } });
    client.send(new CreateBucketCommand({ Bucket: bucket })).catch((e) => {
      if (!/BucketAlreadyOwnedByYou|BucketAlreadyExists/.test(e.name)) { console.error(e.message); process.exit(1); }
    });
  ' "http://127.0.0.1:$S3_PORT" "$S3_BUCKET" "${S3_REGION:-us-east-1}" "${S3_ACCESS_KEY_ID:-S3RVER}" "${S3_SECRET_ACCESS_KEY:-S3RVER}")
  echo "S3 fake   http://127.0.0.1:$S3_PORT  bucket $S3_BUCKET (keys S3RVER/S3RVER)"
}

start_mail() {
  [[ "$SMTP_LOCAL" = 1 ]] || { echo "SMTP: not local, not starting maildev."; return 0; }
  mkdir -p "$DATA_DIR/mail"
  start_node_service maildev "$SMTP_PORT" node node_modules/maildev/dist/bin/maildev.js \
    --ip 127.0.0.1 --web-ip 127.0.0.1 -s "$SMTP_PORT" -w "$MAILDEV_WEB_PORT" --mail-directory "$DATA_DIR/mail" --silent
  wait_until "maildev web" 30 port_open "$MAILDEV_WEB_PORT"
  echo "Mail fake smtp://127.0.0.1:$SMTP_PORT  inbox http://127.0.0.1:$MAILDEV_WEB_PORT/index.html"
}

status_line() { # name, pidfile, port
  if alive "$2"; then echo "$1 running (pid $(cat "$2"), port $3)"; else echo "$1 stopped"; fi
}

command="${1:-status}"
mkdir -p "$RUN_DIR"
case "$command" in
  install) install_packages ;;
  start)
    install_packages
    config
    start_mariadb; start_redis; start_s3; start_mail
    echo "Services are up (data in $DATA_DIR)."
    ;;
  stop)
    config
    stop_node_service maildev; stop_node_service s3rver; stop_redis; stop_mariadb
    echo "Services stopped."
    ;;
  status)
    config
    status_line "MariaDB" "$RUN_DIR/mysqld.pid" "$DB_PORT"
    status_line "Redis  " "$RUN_DIR/redis.pid" "$REDIS_PORT"
    status_line "s3rver " "$RUN_DIR/s3rver.pid" "$S3_PORT"
    status_line "maildev" "$RUN_DIR/maildev.pid" "$SMTP_PORT/$MAILDEV_WEB_PORT"
    ;;
  reset-db) config; reset_db ;;
  *) echo "Usage: $0 start|stop|status|install|reset-db" >&2; exit 2 ;;
esac
