#!/usr/bin/env bash
# `npm test`: type checks, unit and integration tests (vitest), end-to-end tests in Debian's Chromium (Playwright).
# Never downloads a browser: Chromium comes from Debian's packages.
set -euo pipefail
cd "$(dirname "$0")/.."

# Debian packages the tests need: Chromium for the browser tests, poppler-utils (pdftotext) to read the
# PDF reports the tests download. Installed here when missing and we may (root with apt-get).
chromium="${CHROMIUM_PATH:-/usr/bin/chromium}"
missing=()
[ -x "$chromium" ] || missing+=(chromium)
command -v pdftotext >/dev/null 2>&1 || missing+=(poppler-utils)
if [ ${#missing[@]} -gt 0 ]; then
	if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
		echo "Installing Debian packages the tests need: ${missing[*]}…"
		apt-get update -qq
		DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
	else
		echo "Missing Debian packages: ${missing[*]}. Install them with: sudo apt-get install -y ${missing[*]}" >&2
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
