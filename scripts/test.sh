#!/usr/bin/env bash
# npm test: everything from a fresh clone to a full test run (unit, database, browser, and
# svelte-check's types as one more test), ending with one line "N passed, N failed".
set -uo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh

MAIL_PID=
# LAPMARK_TEST_DB names the test database (default lapmark_test); two checkouts sharing one
# cluster (LAPMARK_DATA_DIR) run side by side with different names and ports.
TEST_DB=${LAPMARK_TEST_DB:-lapmark_test}
RESULTS="$(app_state_dir)/vitest-$TEST_DB.json"

cleanup() {
	[ -n "$MAIL_PID" ] && kill -TERM "$MAIL_PID" 2>/dev/null && wait "$MAIL_PID" 2>/dev/null
	if [ "${LAPMARK_PG_STARTED:-}" = 1 ]; then pg_stop; fi
}
trap cleanup EXIT

die() { log "$*"; echo "0 passed, 1 failed"; exit 1; }

# A browser for the end-to-end tests: Debian's chromium, never a download.
ensure_chromium() {
	[ -x /usr/bin/chromium ] && return 0
	if [ "$(id -u)" != 0 ]; then
		log "chromium is missing. Install it with:  sudo sh -c 'apt-get update && apt-get install -y chromium'"
		return 1
	fi
	log "installing chromium from Debian's packages"
	(apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium) >&2
}

T0=$(date +%s)
ensure_deps || die "npm ci failed"
ensure_chromium || die "no browser for the end-to-end tests"
if [ -n "${TEST_DATABASE_URL:-}" ]; then export DATABASE_URL=$TEST_DATABASE_URL; fi
if [ -z "${DATABASE_URL:-}" ]; then
	pg_ensure_installed && pg_init || die "PostgreSQL could not be set up"
	if ! pg_running; then pg_start || die "PostgreSQL did not start"; export LAPMARK_PG_STARTED=1; fi
	# A fresh test database each run: tests never see leftovers, and never the demo database.
	pg_drop_database "$TEST_DB" >/dev/null && pg_ensure_database "$TEST_DB" || die "could not create the test database"
	DATABASE_URL=$(pg_url "$TEST_DB")
	export DATABASE_URL
fi
export AUTH_SECRET=${AUTH_SECRET:-test-secret-$(head -c 24 /dev/urandom | base64 | tr -d '\n/+=')}
npx tsx scripts/migrate.ts || die "migrations failed"
# The demo shops, smaller: the browser tests sign in as their users.
npx tsx scripts/seed.ts --if-empty --quiet --heads 240 >/dev/null || die "seeding the test database failed"
ensure_build || die "the build failed"
rm -rf "$(app_state_dir)/mail-$TEST_DB"
start_mail_fake "${LAPMARK_TEST_SMTP_PORT:-2526}" "$(app_state_dir)/mail-$TEST_DB" || die "the fake mail server did not start"
log "set-up took $(( $(date +%s) - T0 )) s"

rm -f "$RESULTS"
npx vitest run --reporter=default --reporter=json --outputFile.json="$RESULTS" "$@"
STATUS=$?

# The types of every .ts and .svelte file (svelte-check), counted as one more test.
log "svelte-check (npm run check)"
# Without colours, on stderr with the other logs, so nothing but the closing line ends stdout.
if npm run --silent check -- --no-color >&2; then CHECK_FAILED=0; else CHECK_FAILED=1; STATUS=1; fi

if [ -s "$RESULTS" ]; then
	# Failed tests, plus files that failed without a failing test (an import error, say).
	node -e '
		const r = JSON.parse(require("fs").readFileSync(process.argv[1], "utf8"));
		const broken = (r.testResults || []).filter((f) => f.status === "failed" && !f.assertionResults.some((a) => a.status === "failed")).length;
		const check = Number(process.argv[2]);
		console.log(`${r.numPassedTests + 1 - check} passed, ${r.numFailedTests + broken + check} failed`);
	' "$RESULTS" "$CHECK_FAILED"
else
	echo "$((1 - CHECK_FAILED)) passed, $((1 + CHECK_FAILED)) failed"
	[ "$STATUS" = 0 ] && STATUS=1
fi
log "tests took $(( $(date +%s) - T0 )) s in all"
exit $STATUS
