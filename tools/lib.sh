# Shared steps of tools/start.sh and tools/test.sh (sourced, not run).

# npm dependencies: install when node_modules is missing or older than the lockfile.
ensure_node_modules() {
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    echo "Installing npm dependencies..."
    npm ci --no-audit --no-fund --loglevel=error
  fi
}

# Debian's Chromium for the browser tests (Playwright never downloads a browser of its own here).
ensure_chromium() {
  if [ -x /usr/bin/chromium ]; then return 0; fi
  echo "Chromium not found: installing it from Debian's packages..."
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq chromium >/dev/null
}

# Rebuild the web app only when its sources or the shared contracts changed since the last build.
build_web_if_stale() {
  local stamp=dist/web/browser/index.html
  if [ -f "$stamp" ] && [ -z "$(find apps/web libs/contracts angular.json tsconfig.json -newer "$stamp" -type f -print -quit)" ]; then
    echo "Web app is up to date."
    return 0
  fi
  echo "Building the web app..."
  NG_CLI_ANALYTICS=false npx ng build --configuration production
}

# Wait until an HTTP URL answers (at most $2 seconds).
wait_for_http() {
  local url=$1 limit=${2:-30} i
  for ((i = 0; i < limit * 5; i++)); do
    if node -e "fetch('$url').then(r=>process.exit(r.ok?0:1),()=>process.exit(1))" 2>/dev/null; then return 0; fi
    sleep 0.2
  done
  echo "Gave up waiting for $url" >&2
  return 1
}
