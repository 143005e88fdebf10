#!/usr/bin/env bash
# npm test: every suite Tauline has, on a machine that may have nothing but Node.js.
# Installs PostgreSQL and Chromium from Debian's packages when missing, runs its own PostgreSQL
# cluster (.pg-test, port 55433 or the next free one), runs the unit and API tests (vitest) and the browser tests
# (Playwright driving Debian's Chromium), stops what it started, and ends with one line of totals.
set -uo pipefail
cd "$(dirname "$0")/.."
export NO_COLOR=1
export TEST_PG_DIR=${TEST_PG_DIR:-.pg-test}
# A cluster of this folder left running by an earlier run (e.g. a direct `npx vitest`) is stopped, and
# when no port is given the first free one from 55433 up is taken, so another PostgreSQL on this
# machine cannot make the run fail.
bash scripts/pg.sh stop "$TEST_PG_DIR" >/dev/null 2>&1 || true
if [ -z "${TEST_PG_PORT:-}" ]; then
  TEST_PG_PORT=55433
  while (exec 3<>"/dev/tcp/127.0.0.1/$TEST_PG_PORT") 2>/dev/null; do TEST_PG_PORT=$((TEST_PG_PORT + 1)); done
fi
export TEST_PG_PORT
artifacts=tests/artifacts
rm -rf "$artifacts"; mkdir -p "$artifacts"

as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo "$@"; fi; }
if [ ! -x "${CHROMIUM_PATH:-/usr/bin/chromium}" ]; then
  echo "Chromium is not installed; installing Debian's chromium package…"
  as_root apt-get update -qq && DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq chromium >/dev/null
fi

bash scripts/pg.sh start "$TEST_PG_DIR" "$TEST_PG_PORT" postgres || { echo "0 passed, 1 failed"; exit 1; }
trap 'bash scripts/pg.sh stop "$TEST_PG_DIR"' EXIT

echo "== unit and API tests (vitest)"
npx vitest run --reporter=default --reporter=json --outputFile="$artifacts/vitest.json"
vitest_rc=$?

echo "== browser tests (Playwright + Chromium)"
npx vite build --logLevel warn && PLAYWRIGHT_JSON_OUTPUT_NAME="$artifacts/playwright.json" npx playwright test --reporter=list,json
e2e_rc=$?

node scripts/test-totals.mjs "$artifacts/vitest.json" "$artifacts/playwright.json"
totals_rc=$?
[ $vitest_rc -eq 0 ] && [ $e2e_rc -eq 0 ] && [ $totals_rc -eq 0 ]
