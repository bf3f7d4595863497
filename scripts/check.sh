#!/usr/bin/env bash
# Every check Plotbank has, in order: the system packages the tests need (installed when missing and allowed), types, lint, unit + API tests on PGlite, the web export, browser tests in
# Chromium, and the API tests again on a real PostgreSQL server. Ends with one "N passed, N failed" line.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup-test-deps.sh || { echo "check: stopped before any test, the packages above are missing"; exit 1; }
mkdir -p tests/artifacts
results=tests/artifacts/results
rm -rf "$results" && mkdir -p "$results"
failed_steps=()

step() {
  local name=$1; shift
  echo "::: $name"
  local started=$SECONDS
  if "$@"; then echo "::: $name ok ($((SECONDS - started)) s)"; else echo "::: $name FAILED ($((SECONDS - started)) s)"; failed_steps+=("$name"); fi
}

step typecheck npm run --silent typecheck
step lint npm run --silent lint
step "formatting (prettier)" npm run --silent format:check
step "unused files, exports and dependencies (knip)" npm run --silent unused
step "unit and API tests (PGlite)" npx vitest run --project unit --project server --reporter=default --reporter=json --outputFile="$results/pglite.json"
step "web export" env PLOTBANK_REBUILD_WEB=1 npm run --silent build:web
step "browser tests (Chromium)" npx vitest run --project browser --reporter=default --reporter=json --outputFile="$results/browser.json"
step "API tests (PostgreSQL)" bash scripts/test-pg.sh --reporter=default --reporter=json --outputFile="$results/postgres.json"

node -e '
  const fs = require("fs");
  let passed = 0, failed = 0, skipped = 0;
  for (const f of fs.readdirSync(process.argv[1])) {
    const r = JSON.parse(fs.readFileSync(process.argv[1] + "/" + f, "utf8"));
    passed += r.numPassedTests; failed += r.numFailedTests; skipped += r.numPendingTests + (r.numTodoTests || 0);
  }
  console.log(`check: ${passed} passed, ${failed} failed, ${skipped} skipped`);
' "$results"
if [ ${#failed_steps[@]} -gt 0 ]; then
  echo "Failed steps: ${failed_steps[*]}"
  exit 1
fi
