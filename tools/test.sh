#!/usr/bin/env bash
# npm test: a throwaway PostgreSQL cluster and fake mail server, then every test:
# lint and format check, libraries and API (Vitest, real database) with the web build, web unit tests
# (ng test) and type checks beside them, then the browser tests (Playwright).
set -euo pipefail
cd "$(dirname "$0")/.."
source tools/lib.sh

PGPORT=${TEST_PGPORT:-5434}
export SMTP_PORT=${TEST_SMTP_PORT:-2526}
MAIL_HTTP_PORT=${TEST_MAIL_HTTP_PORT:-2581}
TEST_DIR=.test-data
export E2E_PORT=${E2E_PORT:-3100}

ensure_node_modules
tools/pg.sh ensure
ensure_chromium

pids=()
cleanup() {
  trap - INT TERM EXIT
  for pid in "${pids[@]}"; do kill "$pid" 2>/dev/null || true; done
  tools/pg.sh stop "$TEST_DIR/pg"
}
trap cleanup INT TERM EXIT

tools/pg.sh stop "$TEST_DIR/pg"
rm -rf "$TEST_DIR"
mkdir -p "$TEST_DIR"

# Lint and the format check run beside each other, the cluster's start-up, the API build and then
# the suites (each takes one core); a failure of either stops the run as soon as it is known.
{ echo "== Lint (eslint)" && npm run -s lint; } > "$TEST_DIR/lint.log" 2>&1 &
lint=$!
pids+=($lint)
{ echo "== Format (prettier --check)" && npm run -s format:check; } > "$TEST_DIR/format.log" 2>&1 &
format=$!
pids+=($format)

tools/pg.sh start "$TEST_DIR/pg" "$PGPORT" fast
tools/pg.sh createdb "$PGPORT" nightyard_test
# One database per browser-test worker (playwright.config.ts, e2e/ports.ts): nightyard_e2e, nightyard_e2e_2...
export E2E_WORKERS=${E2E_WORKERS:-2}
tools/pg.sh createdb "$PGPORT" nightyard_e2e
for ((i = 2; i <= E2E_WORKERS; i++)); do tools/pg.sh createdb "$PGPORT" "nightyard_e2e_$i"; done

node tools/build-api.mjs
FAKE_SMTP_PORT=$SMTP_PORT FAKE_MAIL_HTTP_PORT=$MAIL_HTTP_PORT node dist/api/fake-mail.mjs &
pids+=($!)
export FAKE_MAIL_URL=http://127.0.0.1:$MAIL_HTTP_PORT
wait_for_http "$FAKE_MAIL_URL/messages" 20

export DATABASE_URL=postgres://postgres@127.0.0.1:$PGPORT/nightyard_test
export E2E_DATABASE_URL=postgres://postgres@127.0.0.1:$PGPORT/nightyard_e2e
export NG_CLI_ANALYTICS=false

# Beside the API tests (two files at a time, each worker on its own copy of the database, often
# waiting on PostgreSQL or on the processes they start): the production web build the browser
# tests need, then the web unit tests, then the types of the API, the engine, the tools and the
# browser tests (the web app's are checked by its build). The browser tests then have both cores.
{
  build_web_if_stale && node tools/initial-size.mjs &&
    echo "== Web unit tests (ng test)" && npx ng test --watch=false &&
    echo "== Types (tsc)" && npx tsc -p apps/api/tsconfig.json &&
    npx tsc -p tsconfig.checks.json
} > "$TEST_DIR/web.log" 2>&1 &
web=$!
pids+=($web)

# Vitest is the longest phase before the browser tests: it starts at once rather than after lint and
# the format check (about half a minute), which then print their result after it.
echo "== [${SECONDS}s] Libraries and API (Vitest, PostgreSQL on 127.0.0.1:$PGPORT)"
node_modules/.bin/vitest run &
vitest=$!
pids+=($vitest)

lint_status=0
wait "$lint" || lint_status=$?
wait "$format" || lint_status=$((lint_status + $?))
if [ "$lint_status" -ne 0 ]; then
  kill "$vitest" 2>/dev/null || true
  wait "$vitest" 2>/dev/null || true
  cat "$TEST_DIR/lint.log" "$TEST_DIR/format.log"
  echo "Lint or format check failed: fix the code (npm run lint, npm run format), see DEVELOPERS.md." >&2
  exit 1
fi
wait "$vitest"
cat "$TEST_DIR/lint.log" "$TEST_DIR/format.log"

echo "== [${SECONDS}s] Web build, web unit tests (ng test) and types (tsc), run beside Vitest"
if ! wait "$web"; then
  cat "$TEST_DIR/web.log"
  echo "The web build, the web unit tests or the type check failed." >&2
  exit 1
fi
cat "$TEST_DIR/web.log"

echo "== [${SECONDS}s] Browser tests (Playwright, Debian's Chromium, $E2E_WORKERS workers, each on servers of its own)"
npx playwright test

echo "All test suites passed (${SECONDS}s)."
