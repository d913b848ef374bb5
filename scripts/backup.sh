#!/usr/bin/env bash
# npm run backup [-- FILE]: one file with everything needed to bring this Lapmark back: a dump
# of the database (pg_dump's custom format, taken in one snapshot, so consistent while the app
# runs) and the data folder's secrets (the database password, the session-signing secret).
# FILE defaults to lapmark-backup-YYYYMMDD-HHMMSS.tar in the current folder; it is a tar file
# of mode 600, since the secrets are in it. Restore with `npm run restore FILE`.
#
# Environment: LAPMARK_DATA_DIR, LAPMARK_PG_PORT as for npm start; LAPMARK_DB names the
# database (default lapmark).
set -euo pipefail
LAPMARK_ROOT=$(cd "$(dirname "$0")/.." && pwd)
. "$LAPMARK_ROOT/scripts/common.sh"

DB=${LAPMARK_DB:-lapmark}
OUT=${1:-lapmark-backup-$(date -u +%Y%m%d-%H%M%S).tar}
case "$OUT" in -*) log "usage: npm run backup [-- FILE]  (FILE: where to write the backup)"; exit 2 ;; esac
if [ -e "$OUT" ]; then log "backup: $OUT already exists; give a new FILE name"; exit 1; fi
if [ -n "${DATABASE_URL:-}" ]; then
	log "backup: DATABASE_URL is set; this command backs up Lapmark's own cluster only (use pg_dump for an outside server)"
	exit 1
fi

scratch_folder_and_cleanup

ROOT=$(pg_data_root)
if [ ! -f "$ROOT/pg/PG_VERSION" ]; then log "backup: no database in $ROOT (nothing to back up)"; exit 1; fi
if ! pg_running; then pg_start; STARTED=1; fi

umask 077
mkdir -p "$STAGE/secrets"
PGPASSWORD=$(cat "$ROOT/password") "$PG_BIN/pg_dump" -h 127.0.0.1 -p "$PG_PORT" -U lapmark_admin \
	--format=custom --file="$STAGE/database.dump" "$DB"
cp "$ROOT/password" "$STAGE/secrets/db-password"
STATE=$(app_state_dir)
[ -f "$STATE/auth-secret" ] && cp "$STATE/auth-secret" "$STAGE/secrets/auth-secret"
printf 'lapmark-backup 1\ndatabase %s\npostgresql %s\ncreated %s\n' "$DB" "$PG_VERSION" "$(date -u +%FT%TZ)" > "$STAGE/MANIFEST"
tar -C "$STAGE" -cf "$OUT.partial" MANIFEST database.dump secrets
chmod 600 "$OUT.partial"
mv "$OUT.partial" "$OUT"
log "backup written to $OUT ($(du -h "$OUT" | cut -f1), mode 600: it holds the secrets)"
