#!/usr/bin/env bash
# npm test: a throwaway PostgreSQL cluster and fake mail server, then every test:
# lint and format check, libraries and API (Vitest, real database), web unit tests (ng test), browser tests (Playwright).
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

# Lint (and the format check) run beside the cluster's start-up and the API build; the suites
# start once they pass.
{
  echo "== Lint (eslint)" && npm run -s lint &&
    echo "== Format (prettier --check)" && npm run -s format:check
} > "$TEST_DIR/lint.log" 2>&1 &
lint=$!
pids+=($lint)

tools/pg.sh start "$TEST_DIR/pg" "$PGPORT" fast
tools/pg.sh createdb "$PGPORT" nightyard_test
tools/pg.sh createdb "$PGPORT" nightyard_e2e

node tools/build-api.mjs
FAKE_SMTP_PORT=$SMTP_PORT FAKE_MAIL_HTTP_PORT=$MAIL_HTTP_PORT node dist/api/fake-mail.mjs &
pids+=($!)
export FAKE_MAIL_URL=http://127.0.0.1:$MAIL_HTTP_PORT
wait_for_http "$FAKE_MAIL_URL/messages" 20

export DATABASE_URL=postgres://postgres@127.0.0.1:$PGPORT/nightyard_test
export E2E_DATABASE_URL=postgres://postgres@127.0.0.1:$PGPORT/nightyard_e2e
export NG_CLI_ANALYTICS=false

# The production web build the browser tests need runs beside the API tests: those mostly wait
# on PostgreSQL (two files at a time, each worker on its own copy of the database).
# The types of the API, the engine, the tools and the browser tests are checked after it (the
# web app's are checked by its build).
{ build_web_if_stale && node tools/initial-size.mjs && echo "== Types (tsc)" && npx tsc -p apps/api/tsconfig.json && npx tsc -p libs/scheduling/tsconfig.json \
  && npx tsc -p tsconfig.checks.json; } > .test-data/web-build.log 2>&1 &
web_build=$!
pids+=($web_build)

if ! wait "$lint"; then
  cat "$TEST_DIR/lint.log"
  echo "Lint or format check failed: fix the code (npm run lint, npm run format), see DEVELOPERS.md." >&2
  exit 1
fi
cat "$TEST_DIR/lint.log"

echo "== Libraries and API (Vitest, PostgreSQL on 127.0.0.1:$PGPORT)"
npx vitest run

echo "== Web unit tests (ng test)"
npx ng test --watch=false

echo "== Browser tests (Playwright, Debian's Chromium)"
if ! wait "$web_build"; then
  cat .test-data/web-build.log
  echo "The web build or the type check failed." >&2
  exit 1
fi
cat .test-data/web-build.log
npx playwright test

echo "All test suites passed."
