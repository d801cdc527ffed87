#!/usr/bin/env bash
# `npm test`: type checks, unit and integration tests (vitest), end-to-end tests in Debian's Chromium (Playwright).
# Never downloads a browser: Chromium comes from Debian's packages.
set -euo pipefail
cd "$(dirname "$0")/.."

chromium="${CHROMIUM_PATH:-/usr/bin/chromium}"
if [ ! -x "$chromium" ]; then
	if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
		echo "Chromium is missing: installing Debian's chromium package…"
		apt-get update -qq
		DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
	else
		echo "Chromium is missing at $chromium. Install it with: sudo apt-get install -y chromium" >&2
		echo "(or point CHROMIUM_PATH at a Chromium binary). Stillpoint never downloads a browser." >&2
		exit 1
	fi
fi

if [ ! -f node_modules/better-sqlite3/build/Release/better_sqlite3.node ]; then
	echo "better-sqlite3's native module was not built; run npm install (it compiles it from source)." >&2
	exit 1
fi

mkdir -p test-artifacts/screens
rm -f test-artifacts/vitest.json test-artifacts/playwright.json

echo "== type checks (svelte-check, tsc)"
npm run --silent check

echo "== build"
npx vite build --logLevel warn

status=0
echo "== unit and integration tests (vitest)"
npx vitest run --reporter=default --reporter=json --outputFile.json=test-artifacts/vitest.json || status=1

echo "== end-to-end tests (Playwright, Chromium)"
PLAYWRIGHT_JSON_OUTPUT_NAME=test-artifacts/playwright.json npx playwright test --reporter=list,json || status=1

node scripts/test-summary.mjs test-artifacts/vitest.json test-artifacts/playwright.json || status=1
exit $status
