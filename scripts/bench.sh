#!/usr/bin/env bash
# npm run bench:<name>: bench/<name>.ts against a scratch database of its own in the private
# cluster (lapmark_bench_<name>, migrated, dropped afterwards; KEEP_BENCH_DB=1 keeps it) and a
# fresh build of the app. Each bench prints its figures and ends with one line of JSON.
# BENCH_REUSE=1 starts from the database a KEEP_BENCH_DB=1 run left (and keeps it): bench/stats.ts
# then skips seeding when the readings are there.
#   bash scripts/bench.sh import    the CSV import against psql \copy (bench/import.ts)
#   bash scripts/bench.sh stats     statistics routes over HTTP against bare SQL (bench/stats.ts)
#   bash scripts/bench.sh overview  the overview's first load in chromium on the full demo (bench/overview.ts)
#   bash scripts/bench.sh export    the readings export, 1,000,000 rows as CSV and JSON (bench/export.ts)
# The bench gets DATABASE_URL and BENCH_DATABASE_URL (the scratch database), PSQL and BENCH_PSQL.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh

NAME=${1:-}
case "$NAME" in
	stats | import | overview | export) SCRIPT="bench/$NAME.ts" ;;
	*) echo "usage: bash scripts/bench.sh import|stats|overview|export [arguments for the bench]" >&2; exit 2 ;;
esac
shift
[ -f "$SCRIPT" ] || { log "$SCRIPT is not in this checkout"; exit 2; }

ensure_deps
# Always the private cluster, never an outside DATABASE_URL: the bench drops and refills its database.
unset DATABASE_URL
pg_ensure_installed && pg_init
STARTED=
if ! pg_running; then pg_start; STARTED=1; fi
DB=lapmark_bench_$NAME
cleanup() {
	if [ -z "${KEEP_BENCH_DB:-}${BENCH_KEEP:-}${BENCH_REUSE:-}" ]; then pg_drop_database "$DB" >/dev/null 2>&1 || true; fi
	if [ -n "$STARTED" ]; then pg_stop; fi
}
trap cleanup EXIT
[ -n "${BENCH_REUSE:-}" ] || pg_drop_database "$DB" >/dev/null
pg_ensure_database "$DB"
DATABASE_URL=$(pg_url "$DB")
export DATABASE_URL BENCH_DATABASE_URL=$DATABASE_URL PSQL="$PG_BIN/psql" BENCH_PSQL="$PG_BIN/psql"
export AUTH_SECRET=${AUTH_SECRET:-bench-secret-$(head -c 24 /dev/urandom | base64 | tr -d '\n/+=')}
npx tsx scripts/migrate.ts >/dev/null
ensure_build
npx tsx "$SCRIPT" "$@"
