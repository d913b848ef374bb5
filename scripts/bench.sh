#!/usr/bin/env bash
# npm run bench:<name>: runs bench/<name>.ts against a scratch database of its own in the cluster
# (lapmark_bench_<name>), built fresh and dropped afterwards (BENCH_KEEP=1 keeps it).
#   bash scripts/bench.sh stats     statistics routes over HTTP against bare SQL (bench/stats.ts)
#   bash scripts/bench.sh import    the CSV import (bench/import.ts)
# The script gets BENCH_DATABASE_URL (the scratch database), BENCH_PSQL (psql), and, for stats,
# a build of the app to start (`node build`).
set -uo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh

NAME=${1:-}
case "$NAME" in
	stats | import) SCRIPT="bench/$NAME.ts" ;;
	*) echo "usage: bash scripts/bench.sh stats|import [arguments for the bench]" >&2; exit 2 ;;
esac
shift
if [ ! -f "$SCRIPT" ]; then log "$SCRIPT is not in this checkout"; exit 2; fi

ensure_deps || exit 1
# Always the private cluster, never DATABASE_URL: the bench drops and refills its database.
unset DATABASE_URL
pg_ensure_installed && pg_init || exit 1
if ! pg_running; then pg_start || exit 1; export LAPMARK_PG_STARTED=1; fi
BENCH_DB="lapmark_bench_$NAME"
cleanup() {
	if [ "${BENCH_KEEP:-0}" != 1 ]; then pg_drop_database "$BENCH_DB" >/dev/null 2>&1; fi
	if [ "${LAPMARK_PG_STARTED:-}" = 1 ]; then pg_stop; fi
}
trap cleanup EXIT
pg_drop_database "$BENCH_DB" >/dev/null && pg_ensure_database "$BENCH_DB" || exit 1
BENCH_DATABASE_URL=$(pg_url "$BENCH_DB")
export BENCH_DATABASE_URL BENCH_PSQL="$PG_BIN/psql"
if [ "$NAME" = stats ]; then ensure_build || exit 1; fi
npx tsx "$SCRIPT" "$@"
