#!/usr/bin/env bash
# Lapmark's private PostgreSQL: installed from Debian's packages, one cluster under the data
# folder, listening on 127.0.0.1 only. Source this file for its functions, or run it:
#   bash scripts/pg.sh start|stop|restart|status|url [database]
#
# Environment:
#   LAPMARK_DATA_DIR   data folder (default: .lapmark/ in the checkout)
#   LAPMARK_PG_PORT    port (default 54329)
#   DATABASE_URL       when set, that server is used and none is started

PG_VERSION=15
PG_BIN=/usr/lib/postgresql/$PG_VERSION/bin
LAPMARK_ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
PG_PORT=${LAPMARK_PG_PORT:-54329}
PG_APP_ROLE=lapmark
PG_IMPORT_ROLE=lapmark_import

pg_log() { printf '[db] %s\n' "$*" >&2; }

# The data folder. As root the cluster runs as the `postgres` system user, which must be able to
# enter every folder on the way; when it cannot (a checkout under /root, say) the cluster lives
# under /var/lib/lapmark, keyed to the checkout's path so two checkouts never share one.
pg_data_root() {
	if [ -n "${LAPMARK_DATA_DIR:-}" ]; then
		printf '%s\n' "$LAPMARK_DATA_DIR"
	elif [ "$(id -u)" = 0 ] && ! runuser -u postgres -- test -x "$LAPMARK_ROOT" 2>/dev/null; then
		printf '/var/lib/lapmark/%s\n' "$(printf '%s' "$LAPMARK_ROOT" | sha1sum | cut -c1-12)"
	else
		printf '%s\n' "$LAPMARK_ROOT/.lapmark"
	fi
}

# Run a PostgreSQL program as the user that owns the cluster.
pg_as_owner() {
	if [ "$(id -u)" = 0 ]; then
		(cd / && runuser -u postgres -- "$@")
	else
		"$@"
	fi
}

pg_ensure_installed() {
	[ -x "$PG_BIN/postgres" ] && return 0
	local cmd="apt-get update && apt-get install -y postgresql-$PG_VERSION"
	if [ "$(id -u)" != 0 ]; then
		pg_log "PostgreSQL $PG_VERSION is not installed. Install it with:  sudo sh -c '$cmd'"
		return 1
	fi
	pg_log "installing PostgreSQL $PG_VERSION from Debian's packages"
	(apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "postgresql-$PG_VERSION") >&2 || {
		pg_log "could not install PostgreSQL; run: $cmd"
		return 1
	}
	[ -x "$PG_BIN/postgres" ]
}

pg_port_taken() {
	(exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null
}

pg_running() {
	local data; data="$(pg_data_root)/pg"
	[ -f "$data/postmaster.pid" ] && pg_as_owner "$PG_BIN/pg_ctl" -D "$data" status >/dev/null 2>&1
}

# Create the data folder and any missing folder above it, readable by others (755) so that the
# `postgres` user can pass through. Only folders created here get that mode: a folder that already
# existed (/tmp, a home folder) is never changed.
pg_mkdir_own() {
	local dir=$1 missing=()
	while [ ! -e "$dir" ]; do missing=("$dir" "${missing[@]}"); dir=$(dirname "$dir"); done
	local d
	for d in "${missing[@]}"; do
		mkdir "$d" && chmod 755 "$d" || { pg_log "could not create $d"; return 1; }
	done
}

# Create the cluster the first time: a superuser for set-up, and the role the app uses.
# The app's role is not a superuser, so row-level security applies to it.
pg_init() {
	local root data; root=$(pg_data_root); data="$root/pg"
	[ -f "$data/PG_VERSION" ] && return 0
	pg_log "creating a new cluster in $data"
	pg_mkdir_own "$root" || return 1
	mkdir -p "$root/run" "$data"
	chmod 700 "$data"
	[ -f "$root/password" ] || (umask 077; head -c 24 /dev/urandom | base64 | tr -d '/+=' > "$root/password")
	if [ "$(id -u)" = 0 ]; then
		chown -R postgres:postgres "$root"
		if ! runuser -u postgres -- test -x "$root"; then
			pg_log "the postgres user cannot enter $root (a folder above it is closed to other users);"
			pg_log "set LAPMARK_DATA_DIR to a folder it can reach, e.g. /var/lib/lapmark/NAME"
			return 1
		fi
	fi
	local pwfile="$root/password"
	# Data checksums: a page damaged on disk is reported when read, not silently used.
	pg_as_owner "$PG_BIN/initdb" -D "$data" -U lapmark_admin --auth-local=peer --auth-host=scram-sha-256 \
		--pwfile="$pwfile" -E UTF8 --locale=C.UTF-8 --data-checksums >"$root/initdb.log" 2>&1 || {
		pg_log "initdb failed; see $root/initdb.log"
		rm -rf "$data"
		return 1
	}
	cat >>"$data/postgresql.conf" <<CONF
# Lapmark: loopback only, socket inside the data folder.
listen_addresses = '127.0.0.1'
unix_socket_directories = '$root/run'
shared_buffers = 256MB
work_mem = 32MB
maintenance_work_mem = 256MB
max_wal_size = 2GB
CONF
	# Peer authentication over the socket only for the set-up superuser; the app uses a password.
	cat >"$data/pg_hba.conf" <<HBA
local   all   all                     scram-sha-256
host    all   all   127.0.0.1/32      scram-sha-256
HBA
}

pg_start() {
	local root data; root=$(pg_data_root); data="$root/pg"
	if pg_running; then
		pg_log "already running on 127.0.0.1:$PG_PORT"
		return 0
	fi
	if pg_port_taken "$PG_PORT"; then
		pg_log "port $PG_PORT on 127.0.0.1 is taken by another program; set LAPMARK_PG_PORT to a free port"
		return 1
	fi
	pg_as_owner "$PG_BIN/pg_ctl" -D "$data" -o "-p $PG_PORT" -l "$root/postgres.log" -w -t 60 start >/dev/null || {
		pg_log "PostgreSQL did not start; see $root/postgres.log"
		tail -n 20 "$root/postgres.log" >&2
		return 1
	}
	pg_log "PostgreSQL $PG_VERSION listening on 127.0.0.1:$PG_PORT (data: $data)"
}

pg_stop() {
	local data; data="$(pg_data_root)/pg"
	pg_running || return 0
	pg_as_owner "$PG_BIN/pg_ctl" -D "$data" -m fast -w stop >/dev/null && pg_log "PostgreSQL stopped"
}

# A fast restart (open connections are closed, as on an operator's restart or a package update).
pg_restart() {
	local root data; root=$(pg_data_root); data="$root/pg"
	pg_as_owner "$PG_BIN/pg_ctl" -D "$data" -m fast -w -t 60 -o "-p $PG_PORT" -l "$root/postgres.log" restart >/dev/null &&
		pg_log "PostgreSQL restarted"
}

# Run SQL as the set-up superuser.
pg_admin_sql() {
	local root; root=$(pg_data_root)
	PGPASSWORD=$(cat "$root/password") "$PG_BIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 -p "$PG_PORT" \
		-U lapmark_admin -d postgres "$@"
}

# Make sure the app's role, the import's role and the named database exist. Prints nothing.
# lapmark_import (no login) bypasses row-level security so that the bulk import may COPY straight
# into readings; the app's role may switch to it (SET ROLE) and it may only insert readings (granted
# by drizzle/0006). Only a superuser can create a role that bypasses row-level security.
pg_ensure_database() {
	local db=$1 root pw; root=$(pg_data_root); pw=$(cat "$root/password")
	pg_admin_sql -tA -c "select 1 from pg_roles where rolname = '$PG_APP_ROLE'" | grep -q 1 ||
		pg_admin_sql -c "create role $PG_APP_ROLE login password '$pw' nosuperuser nocreatedb nocreaterole"
	pg_admin_sql -tA -c "select 1 from pg_roles where rolname = '$PG_IMPORT_ROLE'" | grep -q 1 ||
		pg_admin_sql -c "create role $PG_IMPORT_ROLE nologin bypassrls nosuperuser nocreatedb nocreaterole" \
			-c "grant $PG_IMPORT_ROLE to $PG_APP_ROLE"
	# It may also load without per-row foreign-key checks (session_replication_role, drizzle/0007);
	# the import checks those keys for the whole batch before it commits.
	pg_admin_sql -tA -c "select has_parameter_privilege('$PG_IMPORT_ROLE', 'session_replication_role', 'SET')" | grep -q t ||
		pg_admin_sql -c "grant set on parameter session_replication_role to $PG_IMPORT_ROLE"
	pg_admin_sql -tA -c "select 1 from pg_database where datname = '$db'" | grep -q 1 ||
		pg_admin_sql -c "create database $db owner $PG_APP_ROLE"
}

pg_drop_database() {
	pg_admin_sql -c "drop database if exists $1 with (force)"
}

pg_url() {
	local db=${1:-lapmark} root; root=$(pg_data_root)
	printf 'postgres://%s:%s@127.0.0.1:%s/%s\n' "$PG_APP_ROLE" "$(cat "$root/password")" "$PG_PORT" "$db"
}

# Everything a command needs: installed, created, started, the database there. Exports
# DATABASE_URL and LAPMARK_PG_STARTED=1 when this call started the server.
pg_up() {
	local db=$1
	if [ -n "${DATABASE_URL:-}" ]; then
		pg_log "using DATABASE_URL; no private server started"
		return 0
	fi
	pg_ensure_installed || return 1
	pg_init || return 1
	if ! pg_running; then
		pg_start || return 1
		export LAPMARK_PG_STARTED=1
	fi
	pg_ensure_database "$db" || return 1
	DATABASE_URL=$(pg_url "$db")
	export DATABASE_URL
}

if [ "${BASH_SOURCE[0]}" = "$0" ]; then
	set -euo pipefail
	case "${1:-}" in
		start) pg_ensure_installed && pg_init && pg_start && pg_ensure_database "${2:-lapmark}" ;;
		stop) pg_stop ;;
		restart) pg_restart ;;
		status) if pg_running; then echo "running on 127.0.0.1:$PG_PORT ($(pg_data_root)/pg)"; else echo "stopped"; exit 3; fi ;;
		url) pg_url "${2:-lapmark}" ;;
		*) echo "usage: bash scripts/pg.sh start|stop|restart|status|url [database]" >&2; exit 2 ;;
	esac
fi
