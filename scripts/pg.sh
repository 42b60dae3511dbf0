#!/usr/bin/env bash
# The project's own PostgreSQL on loopback.
#
#   bash scripts/pg.sh start | stop | status | url | ensure-db NAME | destroy
#
# CYCLEGATE_PG_CLUSTER picks the cluster:
#   main (default)  $CYCLEGATE_DATA_DIR/pg       port ${CYCLEGATE_PG_PORT:-54329}       database cyclegate, fsync on
#   test            $CYCLEGATE_DATA_DIR/pg-test  port ${CYCLEGATE_TEST_PG_PORT:-54339}  database cyclegate_test,
#                   fsync/synchronous_commit/full_page_writes off; `destroy` removes it (npm test does every run)
#
# Layout of a cluster folder: data/ (PGDATA), run/ (the unix socket, mode 700), log/postgres.log, and
# password (mode 600). Authentication: the server listens on 127.0.0.1 only; TCP connections need the
# role's scram-sha-256 password, generated on first start and stored in that password file; the unix
# socket uses trust, but it sits in a folder only the server's OS user (and root) can enter.
# As root the server runs as the postgres system user. When that user cannot reach the data folder
# (e.g. a checkout under /root) the clusters live in /tmp/cyclegate-pg-<hash of the data folder path>.
# The stock cluster on port 5432 is never used or touched.
set -euo pipefail
# shellcheck source=scripts/lib.sh
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"

usage() {
  echo "usage: bash scripts/pg.sh start|stop|status|url|ensure-db NAME|destroy" >&2
  echo "       CYCLEGATE_PG_CLUSTER=main|test selects the cluster (default main)" >&2
  exit 2
}

CLUSTER="${CYCLEGATE_PG_CLUSTER:-main}"
case "$CLUSTER" in
  main) PG_DIRNAME=pg; PG_PORT="${CYCLEGATE_PG_PORT:-54329}"; PG_DB=cyclegate ;;
  test) PG_DIRNAME=pg-test; PG_PORT="${CYCLEGATE_TEST_PG_PORT:-54339}"; PG_DB=cyclegate_test ;;
  *) echo "CYCLEGATE_PG_CLUSTER must be main or test, not '$CLUSTER'" >&2; exit 2 ;;
esac
[[ "$PG_PORT" =~ ^[0-9]+$ ]] && [ "$PG_PORT" -ne 5432 ] || cg_die "invalid PostgreSQL port '$PG_PORT' (5432 is the system's own)"
PG_ROLE="$PG_DB"
IS_ROOT=0; [ "$(id -u)" -eq 0 ] && IS_ROOT=1

DATA_ROOT="${CYCLEGATE_DATA_DIR:-$CG_ROOT/.data}"
mkdir -p "$DATA_ROOT"

# The folder that holds the clusters: the data folder itself, or /tmp when the postgres user
# cannot reach it. Pure: creates nothing, so `url` and `status` resolve the same place as `start`.
pg_base_dir() {
  local data; data="$(realpath -m "$DATA_ROOT")"
  if [ "$IS_ROOT" -eq 1 ] && id postgres >/dev/null 2>&1 && [ -d "$data" ] \
    && ! runuser -u postgres -- test -x "$data" 2>/dev/null; then
    echo "/tmp/cyclegate-pg-$(printf '%s' "$data" | sha256sum | cut -c1-12)"
  elif [ "$IS_ROOT" -eq 1 ] && [ -d "$data" ] && ! id postgres >/dev/null 2>&1; then
    # The user does not exist yet; judge by whether "other" may traverse every parent folder.
    local d="$data"
    while [ "$d" != "/" ]; do
      [ "$(( 0$(stat -c %a "$d") & 1 ))" -eq 1 ] || { echo "/tmp/cyclegate-pg-$(printf '%s' "$data" | sha256sum | cut -c1-12)"; return; }
      d="$(dirname "$d")"
    done
    echo "$data"
  else
    echo "$data"
  fi
}

set_paths() {
  BASE="$(pg_base_dir)"
  DIR="$BASE/$PG_DIRNAME"
  PGDATA_DIR="$DIR/data"
  RUN_DIR="$DIR/run"
  LOG_FILE="$DIR/log/postgres.log"
  PW_FILE="$DIR/password"
}

pg_bin_dir() {
  local found
  found="$(ls -d /usr/lib/postgresql/*/bin/initdb 2>/dev/null | sort -V | tail -n 1 || true)"
  [ -n "$found" ] && dirname "$found"
}

ensure_server_installed() {
  PG_BIN="$(pg_bin_dir || true)"
  if [ -z "$PG_BIN" ]; then
    [ "$IS_ROOT" -eq 1 ] || cg_die "PostgreSQL server binaries are missing; install Debian's postgresql package (sudo apt-get install -y postgresql)"
    cg_log "installing Debian's postgresql package"
    apt-get update
    DEBIAN_FRONTEND=noninteractive apt-get install -y postgresql
    PG_BIN="$(pg_bin_dir || true)"
    [ -n "$PG_BIN" ] || cg_die "apt-get installed postgresql but no /usr/lib/postgresql/*/bin/initdb was found"
  fi
}

ensure_pg_user() {
  [ "$IS_ROOT" -eq 1 ] || return 0
  if ! id postgres >/dev/null 2>&1; then
    cg_log "creating the postgres system user"
    useradd --system --user-group --home-dir /var/lib/postgresql --shell /bin/bash postgres
  fi
}

# Creates the cluster folder layout, owned by the server's OS user where the server writes.
prepare_dirs() {
  if [ "$BASE" != "$(realpath -m "$DATA_ROOT")" ]; then
    if [ ! -d "$BASE" ]; then
      mkdir -m 755 "$BASE"
      cg_log "the postgres user cannot reach $DATA_ROOT; the clusters live in $BASE"
    fi
    [ -O "$BASE" ] || cg_die "$BASE belongs to someone else; remove it or set CYCLEGATE_DATA_DIR"
  fi
  mkdir -p "$DIR" "$PGDATA_DIR" "$RUN_DIR" "$(dirname "$LOG_FILE")"
  chmod 755 "$DIR"
  chmod 700 "$PGDATA_DIR" "$RUN_DIR" "$(dirname "$LOG_FILE")"
  if [ "$IS_ROOT" -eq 1 ]; then
    chown postgres:postgres "$PGDATA_DIR" "$RUN_DIR" "$(dirname "$LOG_FILE")"
  fi
  if [ ! -s "$PW_FILE" ]; then
    (umask 077 && cg_random_hex >"$PW_FILE.tmp" && mv "$PW_FILE.tmp" "$PW_FILE")
  fi
  chmod 600 "$PW_FILE"
}

init_cluster() {
  [ -f "$PGDATA_DIR/PG_VERSION" ] && return 0
  local t0; t0="$(cg_now_ms)"
  [ -z "$(ls -A "$PGDATA_DIR")" ] || cg_die "$PGDATA_DIR is not empty and holds no cluster; move it away"
  local locale_opt=(--no-locale)
  locale -a 2>/dev/null | grep -qiE '^c\.utf-?8$' && locale_opt=(--locale=C.UTF-8)
  cg_log "creating the $CLUSTER PostgreSQL cluster in $DIR"
  cg_as_pg "$PG_BIN/initdb" -D "$PGDATA_DIR" -U postgres -E UTF8 "${locale_opt[@]}" \
    --auth-local=trust --auth-host=scram-sha-256 >"$DIR/log/initdb.log" 2>&1 \
    || { cat "$DIR/log/initdb.log" >&2; cg_die "initdb failed"; }
  cg_as_pg tee "$PGDATA_DIR/pg_hba.conf" >/dev/null <<'EOF'
# Written by scripts/pg.sh. The socket folder is reachable only by the server's OS user.
local   all  all                 trust
host    all  all  127.0.0.1/32   scram-sha-256
EOF
  cg_as_pg bash -c "echo \"include_if_exists = 'cyclegate.conf'\" >>'$PGDATA_DIR/postgresql.conf'"
  cg_log "cluster created in $(cg_since "$t0")"
}

# Rewritten on every start so that a changed port or socket folder takes effect.
write_settings() {
  local durability
  if [ "$CLUSTER" = test ]; then
    durability=$'fsync = off\nsynchronous_commit = off\nfull_page_writes = off'
  else
    durability=$'fsync = on\nsynchronous_commit = on\nfull_page_writes = on'
  fi
  cg_as_pg tee "$PGDATA_DIR/cyclegate.conf" >/dev/null <<EOF
# Written by scripts/pg.sh on every start; edits here are overwritten.
listen_addresses = '127.0.0.1'
port = $PG_PORT
unix_socket_directories = '$RUN_DIR'
unix_socket_permissions = 0700
password_encryption = scram-sha-256
$durability
EOF
}

is_running() {
  [ -n "${PG_BIN:-}" ] || PG_BIN="$(pg_bin_dir || true)"
  [ -n "$PG_BIN" ] && [ -f "$PGDATA_DIR/PG_VERSION" ] \
    && cg_as_pg "$PG_BIN/pg_ctl" status -D "$PGDATA_DIR" >/dev/null 2>&1
}

# Runs SQL from stdin as the superuser over the unix socket.
psql_admin() {
  cg_as_pg "$PG_BIN/psql" -X -q -v ON_ERROR_STOP=1 -h "$RUN_DIR" -p "$PG_PORT" -U postgres -d postgres "$@"
}

# Creates the role (password from the password file, reapplied every start) and database $1 if missing.
ensure_role_and_db() {
  local db="$1" pw; pw="$(cat "$PW_FILE")"
  [[ "$pw" =~ ^[0-9a-f]{32,}$ ]] || cg_die "$PW_FILE does not hold a generated password; delete it and start again"
  # The password goes through stdin, not argv, so it never shows in the process list.
  psql_admin -v role="$PG_ROLE" -v db="$db" >/dev/null <<SQL
SELECT format('CREATE ROLE %I LOGIN', :'role') WHERE NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = :'role') \gexec
ALTER ROLE :"role" WITH LOGIN PASSWORD '$pw';
SELECT format('CREATE DATABASE %I OWNER %I', :'db', :'role') WHERE NOT EXISTS (SELECT 1 FROM pg_database WHERE datname = :'db') \gexec
SQL
}

db_url() { printf 'postgres://%s:%s@127.0.0.1:%s/%s\n' "$PG_ROLE" "$(cat "$PW_FILE")" "$PG_PORT" "$1"; }

lock() {
  mkdir -p "$DIR"
  exec 9>"$DIR/.lock"
  flock 9
}

cmd_start() {
  ensure_server_installed
  ensure_pg_user
  prepare_dirs
  lock
  init_cluster
  if is_running; then
    cg_log "PostgreSQL ($CLUSTER) already running on 127.0.0.1:$PG_PORT"
  else
    if cg_port_busy "$PG_PORT"; then
      cg_die "port $PG_PORT is taken by another program; stop it or set $([ "$CLUSTER" = test ] && echo CYCLEGATE_TEST_PG_PORT || echo CYCLEGATE_PG_PORT)"
    fi
    write_settings
    local t0; t0="$(cg_now_ms)"
    # 9>&- keeps the lock's descriptor out of the postmaster, which would otherwise hold it forever.
    if ! cg_as_pg "$PG_BIN/pg_ctl" start -D "$PGDATA_DIR" -l "$LOG_FILE" -w -t 60 >/dev/null 9>&-; then
      tail -n 20 "$LOG_FILE" >&2 || true
      cg_die "PostgreSQL did not start; full log: $LOG_FILE"
    fi
    cg_log "PostgreSQL ($CLUSTER) started on 127.0.0.1:$PG_PORT in $(cg_since "$t0")"
  fi
  ensure_role_and_db "$PG_DB"
}

cmd_stop() {
  if [ ! -d "$DIR" ] || ! is_running; then
    cg_log "PostgreSQL ($CLUSTER) is not running"
    return 0
  fi
  lock
  local t0; t0="$(cg_now_ms)"
  cg_as_pg "$PG_BIN/pg_ctl" stop -D "$PGDATA_DIR" -m fast -w -t 60 >/dev/null
  cg_log "PostgreSQL ($CLUSTER) stopped in $(cg_since "$t0")"
}

cmd_status() {
  if [ -d "$DIR" ] && is_running; then
    echo "running: $CLUSTER cluster on 127.0.0.1:$PG_PORT, folder $DIR"
  else
    echo "stopped: $CLUSTER cluster, folder $DIR"
    exit 3
  fi
}

cmd_url() {
  [ -s "$PW_FILE" ] || cg_die "the $CLUSTER cluster has not been created yet; run: bash scripts/pg.sh start"
  db_url "${1:-$PG_DB}"
}

cmd_ensure_db() {
  local name="${1:-}"
  [[ "$name" =~ ^[a-z_][a-z0-9_]{0,62}$ ]] || cg_die "database name must match [a-z_][a-z0-9_]* (got '$name')"
  is_running || cg_die "PostgreSQL ($CLUSTER) is not running; run: bash scripts/pg.sh start"
  PG_BIN="$(pg_bin_dir)"
  ensure_role_and_db "$name"
  db_url "$name"
}

cmd_destroy() {
  [ "$CLUSTER" = test ] || cg_die "destroy only removes the throwaway test cluster (CYCLEGATE_PG_CLUSTER=test)"
  [ -d "$DIR" ] || return 0
  cmd_stop
  rm -rf "$DIR"
  cg_log "removed the test cluster in $DIR"
}

set_paths
case "${1:-}" in
  start) cmd_start ;;
  stop) cmd_stop ;;
  status) cmd_status ;;
  url) cmd_url "${2:-}" ;;
  ensure-db) cmd_ensure_db "${2:-}" ;;
  destroy) cmd_destroy ;;
  *) usage ;;
esac
