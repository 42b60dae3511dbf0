#!/usr/bin/env bash
# npm start: dependencies, the project's PostgreSQL, migrations, demo data, a fresh build when the
# sources changed, the local mail server, then the app on http://localhost:$PORT (default 3000).
# With --dev (npm run dev) the same bootstrap, then `next dev` with hot reload instead of a build.
# Ctrl-C stops the app, the mail server and the database; the data stays in $CYCLEGATE_DATA_DIR.
set -euo pipefail
# shellcheck source=scripts/lib.sh
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$CG_ROOT"

mode=start
[ "${1:-}" = "--dev" ] && mode=dev

trap 'cg_shutdown; exit 130' INT
trap 'cg_shutdown; exit 143' TERM
trap 'status=$?; cg_shutdown; exit "$status"' EXIT

t0="$(cg_now_ms)"
cg_env_defaults
cg_bootstrap
# next dev compiles on demand and takes longer to answer its first request.
health_timeout=120
if [ "$mode" = start ]; then
  cg_build_if_stale
  health_timeout=60
fi
cg_start_mail
cg_start_app "$mode"
cg_wait_http "$(cg_local_url)/api/health" "$CG_APP_PID" "$health_timeout"
cg_log "ready in $(cg_since "$t0")"
cg_banner

status=0
wait -n "$CG_APP_PID" "$CG_MAIL_PID" || status=$?
cg_log "the app or the mail server stopped on its own (status $status); shutting down"
exit "$status"
