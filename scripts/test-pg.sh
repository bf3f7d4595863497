#!/usr/bin/env bash
# Run the server test suite against a real PostgreSQL server (Debian's), started on loopback for this run only.
set -euo pipefail
cd "$(dirname "$0")/.."
PGBIN=${PGBIN:-$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)}
if [ -z "$PGBIN" ] || [ ! -x "$PGBIN/initdb" ]; then
  echo "PostgreSQL server binaries not found; install Debian's postgresql package (apt-get install -y postgresql)." >&2
  exit 1
fi
PORT=${PLOTBANK_PG_PORT:-54329}
WORK=$(mktemp -d /tmp/plotbank-pg.XXXXXX)
chmod 755 "$WORK"
mkdir -p "$WORK/data"
# PostgreSQL refuses a data folder it does not own: as root the server runs as the postgres user, otherwise as whoever
# runs this script, who already owns the folder.
if [ "$(id -u)" = 0 ]; then chown -R postgres:postgres "$WORK"; fi
chmod 700 "$WORK/data"
as_postgres() { if [ "$(id -u)" = 0 ]; then su postgres -s /bin/bash -c "$*"; else bash -c "$*"; fi; }
as_postgres "$PGBIN/initdb -D $WORK/data -A trust -U postgres >$WORK/initdb.log"
as_postgres "$PGBIN/pg_ctl -D $WORK/data -l $WORK/server.log -o '-c listen_addresses=127.0.0.1 -p $PORT -k $WORK -c fsync=off -c max_connections=200' -w start >/dev/null"
stop() { as_postgres "$PGBIN/pg_ctl -D $WORK/data -m fast -w stop >/dev/null" || true; rm -rf "$WORK"; }
trap stop EXIT
echo "PostgreSQL $("$PGBIN/postgres" --version | awk '{print $3}') on 127.0.0.1:$PORT"
# `npm start`'s entry point on DATABASE_URL: it migrates that database and its health check names PostgreSQL. It serves
# the web export, which `npm run check` builds before this runs; without one it would start a build, so it is skipped.
if [ -f dist/index.html ]; then
  as_postgres "$PGBIN/createdb -h 127.0.0.1 -p $PORT -U postgres plotbank_main"
  mkdir -p "$WORK/main"
  DATABASE_URL="postgres://postgres@127.0.0.1:$PORT/plotbank_main" PLOTBANK_DATA_DIR="$WORK/main/pglite" PORT=0 HOST=127.0.0.1 \
    PLOTBANK_DEMO=off NODE_ENV=production PLOTBANK_MAIL_OUTBOX_ONLY=1 node --import tsx server/main.ts >"$WORK/main.log" 2>&1 &
  MAIN_PID=$!
  URL=""
  for _ in $(seq 1 240); do
    URL=$(sed -n 's/.* is serving \(http:[^ ]*\) .*/\1/p' "$WORK/main.log")
    if [ -n "$URL" ] || ! kill -0 "$MAIN_PID" 2>/dev/null; then break; fi
    sleep 0.25
  done
  HEALTH=$([ -n "$URL" ] && node -e 'fetch(process.argv[1] + "/api/v1/health").then((r) => r.text()).then(console.log)' "$URL" || true)
  kill -TERM "$MAIN_PID" 2>/dev/null || true
  MAIN_EXIT=0 && wait "$MAIN_PID" || MAIN_EXIT=$?
  if [[ $HEALTH == *'"kind":"postgres","connected":true'* && $MAIN_EXIT == 0 ]]; then
    echo "server/main.ts on DATABASE_URL: $HEALTH; exit $MAIN_EXIT on SIGTERM"
  else
    echo "server/main.ts on DATABASE_URL failed (health: ${HEALTH:-no answer}; exit $MAIN_EXIT):" >&2
    cat "$WORK/main.log" >&2
    exit 1
  fi
else
  echo "server/main.ts on DATABASE_URL: skipped, there is no web export (npm run build:web)"
fi
# The parity run repeats every API test; the long property runs use fewer cases there (the PGlite run has the full count).
FUZZ_UPLOAD_RUNS=${FUZZ_UPLOAD_RUNS:-1000} FUZZ_QUERY_RUNS=${FUZZ_QUERY_RUNS:-1000} PLOTBANK_TEST_DATABASE_URL="postgres://postgres@127.0.0.1:$PORT/postgres" npx vitest run --project server "$@"
