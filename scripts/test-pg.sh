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
mkdir -p "$WORK/data" && chown -R postgres:postgres "$WORK" && chmod 700 "$WORK/data"
as_postgres() { if [ "$(id -u)" = 0 ]; then su postgres -s /bin/bash -c "$*"; else bash -c "$*"; fi; }
as_postgres "$PGBIN/initdb -D $WORK/data -A trust -U postgres >$WORK/initdb.log"
as_postgres "$PGBIN/pg_ctl -D $WORK/data -l $WORK/server.log -o '-c listen_addresses=127.0.0.1 -p $PORT -k $WORK -c fsync=off -c max_connections=200' -w start >/dev/null"
stop() { as_postgres "$PGBIN/pg_ctl -D $WORK/data -m fast -w stop >/dev/null" || true; rm -rf "$WORK"; }
trap stop EXIT
echo "PostgreSQL $("$PGBIN/postgres" --version | awk '{print $3}') on 127.0.0.1:$PORT"
# The parity run repeats every API test; the long property runs use fewer cases there (the PGlite run has the full count).
FUZZ_UPLOAD_RUNS=${FUZZ_UPLOAD_RUNS:-1000} FUZZ_QUERY_RUNS=${FUZZ_QUERY_RUNS:-1000} PLOTBANK_TEST_DATABASE_URL="postgres://postgres@127.0.0.1:$PORT/postgres" npx vitest run --project server "$@"
