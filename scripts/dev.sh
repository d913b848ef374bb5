#!/usr/bin/env bash
# npm run dev: Vite's dev server against the demo database, with the fake mail server.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/common.sh
MAIL_PID=
trap '[ -n "$MAIL_PID" ] && kill "$MAIL_PID" 2>/dev/null; [ "${LAPMARK_PG_STARTED:-}" = 1 ] && pg_stop' EXIT
ensure_deps
pg_up lapmark
ensure_auth_secret
npx tsx scripts/migrate.ts
npx tsx scripts/seed.ts --if-empty
start_mail_fake "${LAPMARK_SMTP_PORT:-2525}" "$(app_state_dir)/mail"
export LAPMARK_DEMO=1
npx vite dev --port "${PORT:-5173}" "$@"
