#!/usr/bin/env bash
# npm run bench:<name>: a scratch database in the private cluster, the built app, then
# bench/<name>.ts, which prints its figures and ends with one line of JSON.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh

NAME=${1:?usage: bash scripts/bench.sh import|stats}
[ -f "bench/$NAME.ts" ] || { log "no benchmark bench/$NAME.ts"; exit 2; }
STARTED=
cleanup() {
	[ -n "${KEEP_BENCH_DB:-}" ] || pg_drop_database "$DB" >/dev/null 2>&1 || true
	[ -n "$STARTED" ] && pg_stop
}
ensure_deps
pg_ensure_installed && pg_init
if ! pg_running; then pg_start; STARTED=1; fi
DB=lapmark_bench_$NAME
trap cleanup EXIT
pg_drop_database "$DB" >/dev/null
pg_ensure_database "$DB"
export DATABASE_URL; DATABASE_URL=$(pg_url "$DB")
export PSQL="$PG_BIN/psql" AUTH_SECRET=${AUTH_SECRET:-bench-secret-$(head -c 24 /dev/urandom | base64 | tr -d '\n/+=')}
npx tsx scripts/migrate.ts >/dev/null
ensure_build
npx tsx "bench/$NAME.ts"
