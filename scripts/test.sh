#!/usr/bin/env bash
# npm test: the whole stack on throwaway resources, then every vitest project (unit, integration,
# e2e). Never touches the main job's data: a fresh test cluster on its own port (recreated every run),
# a fresh mail folder, a one-off session secret, the app on :3100.
#
# Databases in the test cluster: cyclegate_test (DATABASE_URL, for the integration tests) and
# cyclegate_e2e (E2E_DATABASE_URL, used by the running app the browser tests drive), so that
# integration tests which change users or trip the sign-in throttle cannot upset the browser tests.
#
# Extra arguments go to vitest: npm test -- tests/gcode, npm test -- --project unit.
# The last line of the output is always `N passed, N failed` (plus `, N skipped`).
set -uo pipefail
# shellcheck source=scripts/lib.sh
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$CG_ROOT"

export CYCLEGATE_PG_CLUSTER=test
cg_resolve_data_dir
export PORT="${CYCLEGATE_TEST_PORT:-3100}"
export SMTP_PORT="${CYCLEGATE_TEST_SMTP_PORT:-2625}"
export SMTP_URL="smtp://127.0.0.1:$SMTP_PORT"
export MAIL_DIR="$CYCLEGATE_DATA_DIR/test-mail"
export APP_URL="http://localhost:$PORT"
export BASE_URL="$APP_URL"
# Vitest replaces BASE_URL with Vite's base path inside tests; this one survives.
export CYCLEGATE_BASE_URL="$APP_URL"
export COOKIE_SECURE=false
export CYCLEGATE_HOST=127.0.0.1
unset DATABASE_URL E2E_DATABASE_URL
# A one-off secret: the test app must not be able to read cookies of the main app.
SESSION_SECRET="$(cg_random_hex)"
export SESSION_SECRET
cg_env_defaults
CG_PG_STARTED=1

RESULTS_DIR="$CG_ROOT/.test-results"
REPORT="$RESULTS_DIR/vitest.json"
T0="$(cg_now_ms)"

summary_on_abort() {
  CG_FINISHED=1
  cg_shutdown
  node --import tsx scripts/test-summary.ts --boot-failed "$1"
  exit 1
}
trap 'summary_on_abort "interrupted"' INT TERM
trap 'status=$?; [ "${CG_FINISHED:-0}" -eq 1 ] || summary_on_abort "test.sh stopped unexpectedly (status $status)"' EXIT

# Runs one bootstrap step; a failure ends the run with the summary line counting it as one failure.
step() {
  local name="$1" t0; shift
  t0="$(cg_now_ms)"
  cg_log "--- $name"
  if "$@"; then
    cg_log "$name: done in $(cg_since "$t0")"
  else
    cg_log "$name: FAILED"
    summary_on_abort "$name failed"
  fi
}

ensure_chromium() {
  [ -x /usr/bin/chromium ] && return 0
  if [ "$(id -u)" -ne 0 ]; then
    cg_log "Debian's chromium is missing: sudo apt-get install -y chromium"
    return 1
  fi
  cg_log "installing Debian's chromium"
  apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y chromium
}

fresh_cluster() {
  bash scripts/pg.sh destroy && bash scripts/pg.sh start || return 1
  DATABASE_URL="$(bash scripts/pg.sh url)" || return 1
  E2E_DATABASE_URL="$(bash scripts/pg.sh ensure-db cyclegate_e2e)" || return 1
  export DATABASE_URL E2E_DATABASE_URL
}

migrate_and_seed() {
  local url
  for url in "$DATABASE_URL" "$E2E_DATABASE_URL"; do
    DATABASE_URL="$url" cg_migrate || return 1
    DATABASE_URL="$url" cg_seed || return 1
  done
}

fresh_mail() {
  rm -rf "$MAIL_DIR" && mkdir -p "$MAIL_DIR" && cg_start_mail
}

start_test_app() {
  DATABASE_URL="$E2E_DATABASE_URL" cg_start_app start || return 1
  cg_wait_http "$(cg_local_url)/api/health" "$CG_APP_PID" 60
}

step "dependencies" cg_ensure_node_modules
step "chromium" ensure_chromium
step "test database cluster" fresh_cluster
step "migrations and demo data" migrate_and_seed
step "mail server" fresh_mail
step "build" cg_build_if_stale
step "app on $APP_URL" start_test_app
cg_log "stack ready in $(cg_since "$T0")"

mkdir -p "$RESULTS_DIR"
rm -f "$REPORT"
vitest_status=0
t_vitest="$(cg_now_ms)"
"$CG_BIN/vitest" run --reporter=default --reporter=json --outputFile="$REPORT" "$@" || vitest_status=$?
cg_log "vitest finished in $(cg_since "$t_vitest") (status $vitest_status)"

cg_shutdown
CG_FINISHED=1
cg_log "npm test took $(cg_since "$T0")"
node --import tsx scripts/test-summary.ts --json "$REPORT" --exit-code "$vitest_status"
