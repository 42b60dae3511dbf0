# Shared helpers for the scripts that start Cyclegate (start.sh, test.sh, pg.sh).
# Source it; it defines functions and a few variables and runs nothing else.
# Every function returns non-zero on failure by itself: test.sh runs them without set -e, and bash
# ignores set -e inside a function called from an `if` anyway.

CG_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd -P)"
CG_BIN="$CG_ROOT/node_modules/.bin"

cg_log() { printf '[cyclegate] %s\n' "$*" >&2; }
cg_die() { printf '[cyclegate] error: %s\n' "$*" >&2; exit 1; }

# Milliseconds since the epoch, for the timings the scripts print.
cg_now_ms() { date +%s%3N; }
cg_since() { printf '%d.%02ds' $(( ($(cg_now_ms) - $1) / 1000 )) $(( ($(cg_now_ms) - $1) % 1000 / 10 )); }

# Runs a command as the OS user that owns the PostgreSQL clusters: postgres when we are root
# (initdb and postgres refuse to run as root), otherwise ourselves. From / so that a cwd the
# postgres user cannot enter (e.g. /root) does not produce warnings.
cg_as_pg() {
  if [ "$(id -u)" -eq 0 ]; then
    (cd / && runuser -u postgres -- "$@")
  else
    (cd / && "$@")
  fi
}

# Sets the defaults every script shares and exports them for the processes it starts.
# Empty strings count as unset, as in the app's env module.
# Creates the data folder (default .data) and exports its absolute path as CYCLEGATE_DATA_DIR.
cg_resolve_data_dir() {
  local data="${CYCLEGATE_DATA_DIR:-$CG_ROOT/.data}"
  mkdir -p "$data"
  CYCLEGATE_DATA_DIR="$(cd "$data" && pwd -P)"
  export CYCLEGATE_DATA_DIR
}

cg_env_defaults() {
  export NEXT_TELEMETRY_DISABLED=1
  cg_resolve_data_dir
  export PORT="${PORT:-3000}"
  export CYCLEGATE_HOST="${CYCLEGATE_HOST:-127.0.0.1}"
  export SMTP_PORT="${SMTP_PORT:-2525}"
  export MAIL_DIR="${MAIL_DIR:-$CYCLEGATE_DATA_DIR/mail}"
  export SMTP_URL="${SMTP_URL:-smtp://127.0.0.1:$SMTP_PORT}"
  export APP_URL="${APP_URL:-http://localhost:$PORT}"
  [ -n "${SESSION_SECRET:-}" ] || export SESSION_SECRET="$(cg_session_secret)"
  [ -n "${CYCLEGATE_DEMO_PASSWORD:-}" ] || unset CYCLEGATE_DEMO_PASSWORD
}

# A random secret of 64 hex characters.
cg_random_hex() {
  if command -v openssl >/dev/null 2>&1; then
    openssl rand -hex 32
  else
    node -e 'process.stdout.write(require("node:crypto").randomBytes(32).toString("hex"))'
  fi
}

# Prints the session secret kept in the data folder, creating it (mode 600) on first use.
cg_session_secret() {
  local file="$CYCLEGATE_DATA_DIR/session-secret" secret=""
  [ -f "$file" ] && secret="$(tr -d '\n' <"$file")"
  if [ "${#secret}" -lt 32 ]; then
    [ -f "$file" ] && cg_log "session secret in $file is shorter than 32 characters; generating a new one"
    secret="$(cg_random_hex)"
    (umask 077 && printf '%s\n' "$secret" >"$file.tmp" && mv "$file.tmp" "$file")
  fi
  chmod 600 "$file"
  printf '%s' "$secret"
}

cg_ensure_node_modules() {
  if [ ! -d "$CG_ROOT/node_modules" ]; then
    local t0; t0="$(cg_now_ms)"
    cg_log "node_modules is missing: running npm ci"
    (cd "$CG_ROOT" && npm ci --no-audit --no-fund) || { cg_log "npm ci failed"; return 1; }
    cg_log "npm ci done in $(cg_since "$t0")"
  fi
}

# Prints the first tracked source newer than the last build, or nothing when the build is current.
cg_stale_source() {
  local stamp="$CG_ROOT/.next/BUILD_ID"
  if [ ! -f "$stamp" ]; then
    echo ".next/BUILD_ID (no build yet)"
    return
  fi
  local candidates=() p
  for p in app components db lib public next.config.ts next.config.mjs postcss.config.mjs \
    tailwind.config.ts tailwind.config.js package-lock.json tsconfig.json; do
    [ -e "$CG_ROOT/$p" ] && candidates+=("$p")
  done
  [ "${#candidates[@]}" -gt 0 ] || return 0
  # Folders count too: adding, removing or renaming a file changes its folder's time.
  (cd "$CG_ROOT" && find "${candidates[@]}" -newer "$stamp" \
    ! -name '*.test.ts' ! -name '*.test.tsx' ! -name '*.md' -print -quit)
}

# Builds the app with next build when the build is missing or older than a source.
# A lock keeps `npm start` and `npm test` from building into .next at the same time.
cg_build_if_stale() {
  local why; why="$(cg_stale_source)"
  if [ -z "$why" ]; then
    cg_log "build is up to date"
    return 0
  fi
  local t0; t0="$(cg_now_ms)"
  cg_log "building the app (changed: $why)"
  (cd "$CG_ROOT" && flock "$CYCLEGATE_DATA_DIR/build.lock" "$CG_BIN/next" build) || { cg_log "next build failed"; return 1; }
  cg_log "build done in $(cg_since "$t0")"
}

cg_migrate() {
  local t0; t0="$(cg_now_ms)"
  (cd "$CG_ROOT" && "$CG_BIN/tsx" scripts/migrate.ts) || { cg_log "migrations failed"; return 1; }
  cg_log "migrations applied in $(cg_since "$t0")"
}

cg_seed() {
  local t0; t0="$(cg_now_ms)"
  (cd "$CG_ROOT" && "$CG_BIN/tsx" scripts/seed.ts) || { cg_log "seeding the demo data failed"; return 1; }
  cg_log "demo data checked in $(cg_since "$t0")"
}

# True when something already accepts connections on 127.0.0.1:$1.
cg_port_busy() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# Waits until $1 answers 200, failing early when process $2 has exited. Timeout $3 seconds (default 60).
cg_wait_http() {
  local url="$1" pid="$2" limit="${3:-60}" t0; t0="$(cg_now_ms)"
  while true; do
    if curl -fsS -o /dev/null --max-time 5 "$url" 2>/dev/null; then
      cg_log "$url answered in $(cg_since "$t0")"
      return 0
    fi
    kill -0 "$pid" 2>/dev/null || { cg_log "the process serving $url exited"; return 1; }
    [ $(( $(cg_now_ms) - t0 )) -lt $(( limit * 1000 )) ] || { cg_log "$url did not answer within ${limit}s"; return 1; }
    sleep 0.25
  done
}

# Waits until something listens on 127.0.0.1:$1, failing early when process $2 has exited.
cg_wait_port() {
  local port="$1" pid="$2" i
  for i in $(seq 1 120); do
    cg_port_busy "$port" && return 0
    kill -0 "$pid" 2>/dev/null || return 1
    sleep 0.1
  done
  return 1
}

# Starts the fake SMTP server in the background; sets CG_MAIL_PID.
cg_start_mail() {
  mkdir -p "$MAIL_DIR" || return 1
  if cg_port_busy "$SMTP_PORT"; then
    cg_log "port $SMTP_PORT is in use: stop what listens there or set SMTP_PORT"
    return 1
  fi
  (cd "$CG_ROOT" && exec node --import tsx scripts/mail-server.ts --port "$SMTP_PORT" --dir "$MAIL_DIR") &
  CG_MAIL_PID=$!
  if ! cg_wait_port "$SMTP_PORT" "$CG_MAIL_PID"; then
    cg_log "the mail server did not start"
    return 1
  fi
}

# Sends SIGTERM to a process we started and waits for it; one that is still there after 20 s gets
# SIGKILL, so Ctrl-C never hangs. Bash reaps its children as they exit, so kill -0 fails once the
# process has gone; `wait` then collects the status (143 after SIGTERM), which is not an error here.
cg_stop_pid() {
  local pid="$1" name="$2" i
  [ -n "$pid" ] || return 0
  local t0; t0="$(cg_now_ms)"
  kill -TERM "$pid" 2>/dev/null || true
  for i in $(seq 1 200); do
    kill -0 "$pid" 2>/dev/null || break
    sleep 0.1
  done
  if kill -0 "$pid" 2>/dev/null; then
    cg_log "$name ignored SIGTERM for 20 s; killing it"
    kill -KILL "$pid" 2>/dev/null || true
  fi
  wait "$pid" 2>/dev/null || true
  cg_log "stopped $name in $(cg_since "$t0")"
}

# Starts the app (built, or `next dev` with mode dev) in the background; sets CG_APP_PID.
cg_start_app() {
  local mode="$1"
  if cg_port_busy "$PORT"; then
    cg_log "port $PORT is in use: stop what listens there or set PORT"
    return 1
  fi
  # scripts/serve.ts wraps next so that client-sent forwarding headers cannot forge the caller's address.
  local flag="" node_env=production
  [ "$mode" = "dev" ] && flag="--dev" && node_env=development
  (cd "$CG_ROOT" && NODE_ENV="$node_env" exec node --import tsx scripts/serve.ts $flag) &
  CG_APP_PID=$!
}

# Where the scripts themselves reach the app (a wildcard bind address is not one to connect to).
cg_local_url() {
  case "$CYCLEGATE_HOST" in
    0.0.0.0 | :: | 127.0.0.1 | localhost) echo "http://127.0.0.1:$PORT" ;;
    *) echo "http://$CYCLEGATE_HOST:$PORT" ;;
  esac
}

# Brings up the main cluster unless DATABASE_URL points elsewhere; sets CG_PG_STARTED=1 when
# this run started it (only then does shutdown stop it).
cg_start_database() {
  CG_PG_STARTED=0
  if [ -n "${DATABASE_URL:-}" ]; then
    cg_log "DATABASE_URL is set: using that database, not the project's own cluster"
    return 0
  fi
  bash "$CG_ROOT/scripts/pg.sh" status >/dev/null 2>&1 || CG_PG_STARTED=1
  bash "$CG_ROOT/scripts/pg.sh" start || return 1
  DATABASE_URL="$(bash "$CG_ROOT/scripts/pg.sh" url)" || return 1
  export DATABASE_URL
}

# Everything before the app: dependencies, database, migrations, demo data.
cg_bootstrap() {
  cg_ensure_node_modules || return 1
  cg_start_database || return 1
  cg_migrate || return 1
  cg_seed || return 1
}

# Stops what this run started, newest first; safe to call twice and from traps.
cg_shutdown() {
  [ "${CG_SHUTDOWN_DONE:-0}" -eq 1 ] && return 0
  CG_SHUTDOWN_DONE=1
  trap '' INT TERM
  cg_stop_pid "${CG_APP_PID:-}" "the app" || true
  cg_stop_pid "${CG_MAIL_PID:-}" "the mail server" || true
  if [ "${CG_PG_STARTED:-0}" -eq 1 ]; then
    bash "$CG_ROOT/scripts/pg.sh" stop || true
  fi
}

cg_banner() {
  local pw="cyclegate-demo"
  [ -n "${CYCLEGATE_DEMO_PASSWORD:-}" ] && pw="the value of CYCLEGATE_DEMO_PASSWORD"
  local mail_dir="${MAIL_DIR#"$CG_ROOT"/}"
  cat >&2 <<EOF

  Cyclegate is running at http://localhost:$PORT

  Demo sign-ins (password: $pw, as first seeded):
    admin@cyclegate.test        admin
    lead@cyclegate.test         lead
    programmer@cyclegate.test   programmer
    operator@cyclegate.test     operator

  Mail the app sends:  $SMTP_URL  ->  $mail_dir/*.eml
  Database:            ${DATABASE_URL%%:*}://…@${DATABASE_URL##*@}
  Press Ctrl-C to stop the app, the mail server and the database.

EOF
}
