#!/usr/bin/env bash
# The system packages the test suite needs beyond node_modules: Debian's chromium (the browser tests drive it through
# playwright-core) and postgresql (scripts/test-pg.sh starts a throw-away server from its binaries). Installs what is
# missing when it may (as root, or through sudo without a password prompt); otherwise it names exactly what to install
# and fails, so `npm run check` stops before any test rather than failing half-way through.
set -euo pipefail

chromium=${CHROMIUM_PATH:-/usr/bin/chromium}
need=()
[ -x "$chromium" ] || need+=(chromium)
if [ -n "${PGBIN:-}" ]; then [ -x "$PGBIN/initdb" ] || need+=(postgresql)
else ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 || need+=(postgresql); fi

if [ ${#need[@]} -eq 0 ]; then
  echo "test dependencies: chromium and postgresql are installed"
  exit 0
fi

if [ "$(id -u)" = 0 ]; then as_root=()
elif command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then as_root=(sudo -n)
else
  {
    echo "test dependencies missing: ${need[*]}"
    echo "Install them as root, then run the tests again:"
    echo "  apt-get update && apt-get install -y ${need[*]}"
    [ -x "$chromium" ] || echo "(or set CHROMIUM_PATH to a Chromium binary; PGBIN to a folder holding PostgreSQL's initdb and pg_ctl)"
  } >&2
  exit 1
fi

if ! command -v apt-get >/dev/null 2>&1; then
  echo "test dependencies missing: ${need[*]}; this is not a Debian-like system (no apt-get): install Chromium and the PostgreSQL server binaries (15 or newer) with its package manager, and set CHROMIUM_PATH and PGBIN if they live elsewhere" >&2
  exit 1
fi

echo "test dependencies: installing ${need[*]} (Debian packages, about a minute)"
export DEBIAN_FRONTEND=noninteractive
"${as_root[@]}" env DEBIAN_FRONTEND=noninteractive apt-get update -qq
"${as_root[@]}" env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${need[@]}" >/dev/null
[ -x "$chromium" ] || { echo "chromium was installed but $chromium is still missing; set CHROMIUM_PATH" >&2; exit 1; }
echo "test dependencies: installed ${need[*]}"
