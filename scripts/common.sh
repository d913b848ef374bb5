#!/usr/bin/env bash
# Steps shared by `npm start` and `npm test`. Sourced, not run.

LAPMARK_ROOT=${LAPMARK_ROOT:-$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)}
# shellcheck source=scripts/pg.sh
. "$LAPMARK_ROOT/scripts/pg.sh"

log() { printf '[lapmark] %s\n' "$*" >&2; }

# Dependencies: `npm ci` when node_modules is missing or older than the lock file.
ensure_deps() {
	if [ ! -d "$LAPMARK_ROOT/node_modules" ] || [ "$LAPMARK_ROOT/package-lock.json" -nt "$LAPMARK_ROOT/node_modules/.package-lock.json" ]; then
		log "installing dependencies (npm ci)"
		(cd "$LAPMARK_ROOT" && npm ci --no-audit --no-fund --loglevel=error) || return 1
	fi
}

# Folder for the app's own files (secret, mail): beside the database's, or .lapmark/ when an
# outside DATABASE_URL is used.
app_state_dir() {
	local d
	if [ -n "${LAPMARK_DATA_DIR:-}" ]; then d=$LAPMARK_DATA_DIR; else d="$LAPMARK_ROOT/.lapmark"; fi
	mkdir -p "$d/app"
	printf '%s\n' "$d/app"
}

# AUTH_SECRET signs session cookies; kept in the state folder so sessions survive restarts.
ensure_auth_secret() {
	[ -n "${AUTH_SECRET:-}" ] && return 0
	local f; f="$(app_state_dir)/auth-secret"
	[ -s "$f" ] || (umask 077; head -c 48 /dev/urandom | base64 | tr -d '\n/+=' > "$f")
	AUTH_SECRET=$(cat "$f")
	export AUTH_SECRET
}

# Build when build/ is missing or any source is newer than it.
ensure_build() {
	local stamp="$LAPMARK_ROOT/build/.lapmark-built"
	if [ -f "$stamp" ] && [ -z "$(cd "$LAPMARK_ROOT" && find src static drizzle package-lock.json svelte.config.js vite.config.ts -newer "$stamp" -print -quit 2>/dev/null)" ]; then
		return 0
	fi
	log "building the app (vite build)"
	(cd "$LAPMARK_ROOT" && npx svelte-kit sync >/dev/null && npx vite build --logLevel error >/dev/null) || { log "the build failed"; return 1; }
	touch "$stamp"
}

# The local fake mail server, unless SMTP_URL points at a real one. Sets SMTP_URL and
# LAPMARK_MAIL_DIR; MAIL_PID is its process.
start_mail_fake() {
	local port=$1 dir=$2
	if [ -n "${SMTP_URL:-}" ]; then return 0; fi
	mkdir -p "$dir"
	if pg_port_taken "$port"; then
		log "port $port for the fake mail server is taken; set LAPMARK_SMTP_PORT to a free port"
		return 1
	fi
	LAPMARK_SMTP_PORT=$port LAPMARK_MAIL_DIR=$dir node --import tsx "$LAPMARK_ROOT/scripts/mail-fake.ts" &
	MAIL_PID=$!
	export SMTP_URL="smtp://127.0.0.1:$port" LAPMARK_MAIL_DIR=$dir
	local i
	for i in $(seq 1 50); do pg_port_taken "$port" && return 0; sleep 0.1; done
	log "the fake mail server did not start"
	return 1
}

# For backup and restore: a scratch folder STAGE removed on exit, and the private PostgreSQL
# stopped on exit when the caller started it (it sets STARTED=1 then).
scratch_folder_and_cleanup() {
	STAGE=$(mktemp -d)
	STARTED=
	trap 'rm -rf "$STAGE"; if [ "$STARTED" = 1 ]; then pg_stop; fi' EXIT
}
