#!/usr/bin/env bash
# npm run restore FILE: brings a backup of `npm run backup` back into an EMPTY data folder
# (LAPMARK_DATA_DIR, or .lapmark/ in the checkout): a new cluster with the saved database
# password, the database restored from the dump, the session-signing secret put back (so
# signed-in sessions stay valid). A data folder with anything in it is refused, never changed.
set -euo pipefail
LAPMARK_ROOT=$(cd "$(dirname "$0")/.." && pwd)
. "$LAPMARK_ROOT/scripts/common.sh"

FILE=${1:-}
if [ -z "$FILE" ]; then log "usage: npm run restore FILE  (FILE: a backup written by npm run backup)"; exit 2; fi
if [ ! -f "$FILE" ]; then log "restore: FILE $FILE does not exist"; exit 2; fi
if [ -n "${DATABASE_URL:-}" ]; then log "restore: DATABASE_URL is set; restore goes into Lapmark's own cluster only"; exit 1; fi

ROOT=$(pg_data_root)
STATE_DIR=${LAPMARK_DATA_DIR:-$LAPMARK_ROOT/.lapmark}
for d in "$ROOT" "$STATE_DIR"; do
	if [ -d "$d" ] && [ -n "$(ls -A "$d")" ]; then
		log "restore: the data folder $d is not empty; restore goes only into an empty one (move it away, or set LAPMARK_DATA_DIR to a new folder)"
		exit 1
	fi
done

scratch_folder_and_cleanup

tar -C "$STAGE" -xf "$FILE" MANIFEST database.dump secrets/db-password 2>/dev/null ||
	{ log "restore: $FILE is not a Lapmark backup (it lacks MANIFEST, database.dump or secrets/db-password)"; exit 1; }
tar -C "$STAGE" -xf "$FILE" secrets/auth-secret 2>/dev/null || true
grep -q '^lapmark-backup 1$' "$STAGE/MANIFEST" || { log "restore: $FILE is not a Lapmark backup of a known version"; exit 1; }
DB=$(sed -n 's/^database //p' "$STAGE/MANIFEST")

# The saved password first: pg_init keeps a password file it finds, and the app's role gets it.
pg_mkdir_own "$ROOT"
(umask 077; cp "$STAGE/secrets/db-password" "$ROOT/password")
pg_ensure_installed
pg_init
pg_start
STARTED=1
pg_ensure_database "$DB"
chmod 755 "$STAGE"
PGPASSWORD=$(cat "$ROOT/password") "$PG_BIN/pg_restore" -h 127.0.0.1 -p "$PG_PORT" -U lapmark_admin \
	--dbname="$DB" --exit-on-error --single-transaction "$STAGE/database.dump"
if [ -f "$STAGE/secrets/auth-secret" ]; then
	(umask 077; cp "$STAGE/secrets/auth-secret" "$(app_state_dir)/auth-secret")
fi
log "restored database $DB into $ROOT; start Lapmark with npm start"
