#!/usr/bin/env bash
# Keeps the web server running: starts WEB_CMD (default `node server.js`), and when it exits without
# being asked to (a crash, a kill), starts it again after a short pause (1 s, growing to 10 s
# while it keeps dying within 10 s of its start). SIGTERM or SIGINT stops the server (SIGTERM,
# then SIGKILL after 8 s) and then this script. `npm start` runs the web server through it.
#
#   WEB_CMD="node server.js" bash scripts/supervise.sh
set -uo pipefail
WEB_CMD=${WEB_CMD:-node server.js}
CHILD=
STOPPING=

wlog() { printf '[web] %s\n' "$*" >&2; }

stop() {
	STOPPING=1
	trap - INT TERM
	if [ -n "$CHILD" ] && kill -0 "$CHILD" 2>/dev/null; then
		kill -TERM "$CHILD" 2>/dev/null
		local i
		for i in $(seq 1 80); do kill -0 "$CHILD" 2>/dev/null || break; sleep 0.1; done
		kill -0 "$CHILD" 2>/dev/null && { wlog "the web server did not stop in 8 s; killing it"; kill -KILL "$CHILD" 2>/dev/null; }
	fi
	wait 2>/dev/null
	exit 0
}
trap stop INT TERM

DELAY=1
while :; do
	STARTED=$(date +%s)
	# exec: the server's pid is the one started here, so signals reach it directly.
	bash -c "exec $WEB_CMD" &
	CHILD=$!
	wlog "started: $WEB_CMD (pid $CHILD)"
	wait "$CHILD"
	CODE=$?
	[ -n "$STOPPING" ] && break
	if [ $(( $(date +%s) - STARTED )) -ge 10 ]; then DELAY=1; fi
	wlog "the web server (pid $CHILD) exited unexpectedly (status $CODE); starting it again in $DELAY s"
	CHILD=
	sleep "$DELAY" &
	wait $!
	[ -n "$STOPPING" ] && break
	DELAY=$(( DELAY * 2 > 10 ? 10 : DELAY * 2 ))
done
