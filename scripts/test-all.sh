#!/usr/bin/env bash
# The one test command (`npm test`): brings what the tests need on a fresh machine, then runs the
# typecheck, the unit tests and the browser tests, and ends with one line "N passed, N failed".
set -uo pipefail
cd "$(dirname "$0")/.."
mkdir -p test-results

# 1. Debian's chromium for the browser tests (a test tool's own browser download cannot work here).
if [ ! -x /usr/bin/chromium ]; then
  echo "== installing Debian's chromium"
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq && DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq chromium >/dev/null || {
    echo "could not install chromium (apt-get failed)"; echo "0 passed, 1 failed"; exit 1; }
fi

# 2. Node packages from the lock file, when missing or stale.
if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "== npm ci"
  npm ci --no-audit --no-fund || { echo "0 passed, 1 failed"; exit 1; }
fi

failed_steps=0
echo "== typecheck"
npx tsc --noEmit -p tsconfig.json || failed_steps=$((failed_steps + 1))

echo "== build (CLI bundle)"
npm run --silent build:cli || failed_steps=$((failed_steps + 1))

echo "== unit tests (vitest)"
npx vitest run --reporter=default --reporter=json --outputFile=test-results/vitest.json
echo "== browser tests (headless chromium)"
node scripts/e2e.mjs 2>&1 | tee test-results/e2e.log

node scripts/test-summary.mjs "$failed_steps"
