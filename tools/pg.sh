#!/usr/bin/env bash
# PostgreSQL on loopback for development and tests.
#   tools/pg.sh ensure                 install the server from Debian's packages if it is missing
#   tools/pg.sh start DIR PORT [fast]  create the cluster in DIR if new, start it on 127.0.0.1:PORT
#   tools/pg.sh stop DIR               stop the cluster in DIR
#   tools/pg.sh createdb PORT NAME     create database NAME unless it exists
# The server refuses to run as root, so it runs as the postgres OS user.
set -euo pipefail

pg_bin() {
  local d
  for d in /usr/lib/postgresql/*/bin; do
    if [ -x "$d/initdb" ] && [ -x "$d/pg_ctl" ]; then echo "$d"; return 0; fi
  done
  return 1
}

as_pg() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

ensure() {
  if pg_bin >/dev/null; then return 0; fi
  echo "PostgreSQL server not found: installing it from Debian's packages..."
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq postgresql >/dev/null
  # Debian's package starts a cluster of its own on 5432; ours run in project folders instead.
  (service postgresql stop || pg_ctlcluster --help >/dev/null 2>&1) >/dev/null 2>&1 || true
  pg_bin >/dev/null
}

start() {
  local dir port fast bin
  dir=$(realpath -m "$1"); port=$2; fast=${3:-}
  bin=$(pg_bin)
  if [ "$(id -u)" = 0 ]; then
    install -d -o postgres -g postgres -m 700 "$dir"
  else
    mkdir -p "$dir"; chmod 700 "$dir"
  fi
  # The postgres user must be able to reach the folder through its parents.
  local p=$dir
  while [ "$p" != / ]; do p=$(dirname "$p"); chmod o+x "$p" 2>/dev/null || true; done
  if [ ! -f "$dir/data/PG_VERSION" ]; then
    as_pg "$bin/initdb" -D "$dir/data" -U postgres --auth=trust -E UTF8 --locale=C.UTF-8 >"$dir/initdb.log"
  fi
  if as_pg "$bin/pg_ctl" -D "$dir/data" status >/dev/null 2>&1; then
    return 0
  fi
  local opts="-c listen_addresses=127.0.0.1 -p $port -k $dir"
  if [ "$fast" = fast ]; then opts="$opts -c fsync=off -c synchronous_commit=off -c full_page_writes=off"; fi
  as_pg "$bin/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -t 60 -o "$opts" start >/dev/null
}

stop() {
  local dir bin
  dir=$(realpath -m "$1"); bin=$(pg_bin)
  if [ -f "$dir/data/postmaster.pid" ]; then
    as_pg "$bin/pg_ctl" -D "$dir/data" -m fast -w stop >/dev/null 2>&1 || true
  fi
}

createdb() {
  local port=$1 name=$2 bin
  bin=$(pg_bin)
  if ! "$bin/psql" -h 127.0.0.1 -p "$port" -U postgres -tAc "select 1 from pg_database where datname='$name'" | grep -q 1; then
    "$bin/psql" -h 127.0.0.1 -p "$port" -U postgres -qc "create database \"$name\"" >/dev/null
  fi
}

cmd=${1:-}; shift || true
case "$cmd" in
  ensure) ensure ;;
  start) start "$@" ;;
  stop) stop "$@" ;;
  createdb) createdb "$@" ;;
  *) echo "usage: tools/pg.sh ensure|start DIR PORT [fast]|stop DIR|createdb PORT NAME" >&2; exit 2 ;;
esac
