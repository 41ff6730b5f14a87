#!/usr/bin/env bash
# npm start: everything Nightyard needs on this machine, then the app on http://localhost:$PORT.
# Data stays in .data/ between runs. Ctrl-C stops all that this script started.
set -euo pipefail
cd "$(dirname "$0")/.."
source tools/lib.sh

export PORT=${PORT:-3000}
PGPORT=${PGPORT:-5433}
export SMTP_PORT=${SMTP_PORT:-2525}
MAIL_HTTP_PORT=${MAIL_HTTP_PORT:-2580}
DATA_DIR=${DATA_DIR:-.data}

ensure_node_modules
tools/pg.sh ensure

pids=()
cleanup() {
  trap - INT TERM EXIT
  echo ""
  echo "Stopping Nightyard..."
  for pid in "${pids[@]}"; do kill "$pid" 2>/dev/null || true; done
  for pid in "${pids[@]}"; do wait "$pid" 2>/dev/null || true; done
  tools/pg.sh stop "$DATA_DIR/pg"
  echo "Stopped. Data is kept in $DATA_DIR/."
}
trap cleanup INT TERM EXIT

tools/pg.sh start "$DATA_DIR/pg" "$PGPORT"
tools/pg.sh createdb "$PGPORT" nightyard
echo "PostgreSQL on 127.0.0.1:$PGPORT (data in $DATA_DIR/pg)"

build_web_if_stale
node tools/build-api.mjs

FAKE_SMTP_PORT=$SMTP_PORT FAKE_MAIL_HTTP_PORT=$MAIL_HTTP_PORT node dist/api/fake-mail.mjs &
pids+=($!)

export DATABASE_URL=${DATABASE_URL:-postgres://postgres@127.0.0.1:$PGPORT/nightyard}
export FAKE_MAIL_URL=${FAKE_MAIL_URL:-http://127.0.0.1:$MAIL_HTTP_PORT}
export NODE_ENV=${NODE_ENV:-development}
node --enable-source-maps dist/api/main.mjs &
pids+=($!)
# Simulated chargers for the demo depot, once the API answers.
wait_for_http "http://127.0.0.1:$PORT/api/health" 120
NIGHTYARD_OCPP_URL="ws://127.0.0.1:$PORT/ocpp" SIMULATOR_HEALTH_PORT=$((PORT + 1)) node dist/api/station-simulator.mjs &
pids+=($!)
wait -n "${pids[@]}"
