#!/usr/bin/env bash
# npm start: everything from a fresh clone to a running Lapmark with demo data.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh

T0=$(date +%s)
PORT=${PORT:-3000}
MAIL_PID=
WEB_PID=

stop_all() {
	trap - INT TERM EXIT
	[ -n "$WEB_PID" ] && kill -TERM "$WEB_PID" 2>/dev/null && wait "$WEB_PID" 2>/dev/null || true
	[ -n "$MAIL_PID" ] && kill -TERM "$MAIL_PID" 2>/dev/null && wait "$MAIL_PID" 2>/dev/null || true
	if [ "${LAPMARK_PG_STARTED:-}" = 1 ]; then pg_stop; fi
	log "stopped"
}
trap 'stop_all; exit 130' INT
trap 'stop_all; exit 143' TERM
trap 'stop_all' EXIT

ensure_deps
# LAPMARK_DEMO=0: a real shop's start, on a database of its own (never the demo's), not seeded.
LAPMARK_DEMO=${LAPMARK_DEMO:-1}
if [ "$LAPMARK_DEMO" = 1 ]; then LAPMARK_DB=${LAPMARK_DB:-lapmark}; else LAPMARK_DB=${LAPMARK_DB:-lapmark_shop}; fi
[[ $LAPMARK_DB =~ ^[a-z_][a-z0-9_]{0,62}$ ]] || { log "LAPMARK_DB must be a database name of lower-case letters, digits and _"; exit 2; }
pg_up "$LAPMARK_DB"
ensure_auth_secret
npx tsx scripts/migrate.ts
if [ "$LAPMARK_DEMO" = 1 ]; then npx tsx scripts/seed.ts --if-empty; else log "no demo (LAPMARK_DEMO=0): database $LAPMARK_DB"; fi
ensure_build
start_mail_fake "${LAPMARK_SMTP_PORT:-2525}" "$(app_state_dir)/mail"

if pg_port_taken "$PORT"; then
	log "port $PORT is taken; set PORT to a free port"
	exit 1
fi
export PORT HOST=${HOST:-127.0.0.1} ORIGIN=${ORIGIN:-http://localhost:$PORT} BODY_SIZE_LIMIT=Infinity LAPMARK_DEMO
# The web server, kept running by the supervisor: a crash or a kill of the server restarts it
# within seconds and leaves the database up. WEB_CMD names the server's command.
WEB_CMD=${WEB_CMD:-node server.js} bash scripts/supervise.sh &
WEB_PID=$!
for _ in $(seq 1 100); do pg_port_taken "$PORT" && break; sleep 0.1; done

if [ "$LAPMARK_DEMO" = 1 ]; then npx tsx scripts/seed.ts --print-signins; fi
log "ready in $(( $(date +%s) - T0 )) s: open $ORIGIN   (Ctrl-C stops the app and the database)"
wait "$WEB_PID"
