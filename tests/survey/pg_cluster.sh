#!/usr/bin/env bash
# A throwaway PostgreSQL cluster for the survey store tests.
#
#   pg_cluster.sh start STATE   makes a cluster in a new temporary folder, starts it
#                               on a free port of 127.0.0.1 (and a unix socket in the
#                               temporary folder), creates database `cairn` with
#                               PostGIS, and writes the connection settings to STATE
#   pg_cluster.sh stop STATE    stops that cluster and removes its folder
#
# The server runs as an unprivileged user: the caller when it is not root, else
# the `postgres` system user that Debian's postgresql package creates (made here
# when missing). A watchdog stops the server when the process that started the
# tests (OWNER_PID, default: the parent of this script) is gone, so a killed test
# run cannot leave a server behind. STATE holds shell assignments:
# PGDIR, PGPORT, PGSOCK, PGURL (superuser URL of database `cairn`), PGUSER_OS.
#
# Source: PostgreSQL 15 documentation, "Creating a Database Cluster" (initdb),
# "pg_ctl", "The Password File" and "Connection URIs" (libpq).
set -euo pipefail

cmd=${1:-}
state=${2:-}
[ -n "$cmd" ] && [ -n "$state" ] || { echo "usage: $0 start|stop STATE" >&2; exit 2; }

bindir=""
for d in /usr/lib/postgresql/15/bin /usr/lib/postgresql/*/bin; do
  [ -x "$d/initdb" ] && { bindir=$d; break; }
done
[ -n "$bindir" ] || { echo "PostgreSQL server binaries not found (apt-get install postgresql-15)" >&2; exit 1; }

as_user() {  # run as the unprivileged cluster owner
  if [ "$(id -u)" -eq 0 ]; then runuser -u "$osuser" -- "$@"; else "$@"; fi
}

stop_cluster() {
  # shellcheck disable=SC1090
  . "$state"
  osuser=$PGUSER_OS
  if [ -d "$PGDIR/data" ]; then
    as_user "$bindir/pg_ctl" -D "$PGDIR/data" -m immediate -w stop >/dev/null 2>&1 || true
  fi
  [ -n "${WATCHDOG:-}" ] && kill "$WATCHDOG" 2>/dev/null || true
  rm -rf "$PGDIR"
  rm -f "$state"
}

case "$cmd" in
  start)
    [ -f "$state" ] && stop_cluster  # a leftover of an earlier run
    if [ "$(id -u)" -eq 0 ]; then
      osuser=postgres
      id -u "$osuser" >/dev/null 2>&1 || useradd --system --home-dir /nonexistent --shell /usr/sbin/nologin "$osuser"
    else
      osuser=$(id -un)
    fi
    dir=$(mktemp -d "${TMPDIR:-/tmp}/cairn-pg-XXXXXX")
    chmod 755 "$dir"
    [ "$(id -u)" -eq 0 ] && chown "$osuser" "$dir"
    port=$(/usr/bin/python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')
    as_user "$bindir/initdb" -D "$dir/data" -U postgres -A trust -E UTF8 --locale=C.UTF-8 >"$dir/initdb.log" 2>&1 ||
      { cat "$dir/initdb.log" >&2; rm -rf "$dir"; exit 1; }
    # Local connections: trust on the socket of the temporary folder (only this
    # machine's users that can reach the folder), passwords (SCRAM) over TCP.
    cat >"$dir/data/pg_hba.conf" <<EOF
local all all trust
host  all all 127.0.0.1/32 scram-sha-256
EOF
    cat >>"$dir/data/postgresql.conf" <<EOF
listen_addresses = '127.0.0.1'
port = $port
unix_socket_directories = '$dir'
fsync = off
max_connections = 40
shared_buffers = 128MB
log_min_messages = warning
EOF
    cat >"$state" <<EOF
PGDIR=$dir
PGPORT=$port
PGSOCK=$dir
PGUSER_OS=$osuser
PGURL='postgresql://postgres@/cairn?host=$dir&port=$port'
EOF
    if ! as_user "$bindir/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -t 60 start >/dev/null; then
      cat "$dir/server.log" >&2 || true
      stop_cluster
      exit 1
    fi
    # Watchdog: stop the server once the test run that started it has ended.
    owner=${OWNER_PID:-$PPID}
    (
      trap '' HUP
      while kill -0 "$owner" 2>/dev/null && [ -d "$dir/data" ]; do sleep 2; done
      if [ -d "$dir/data" ]; then
        as_user "$bindir/pg_ctl" -D "$dir/data" -m immediate -w stop >/dev/null 2>&1 || true
        rm -rf "$dir"
      fi
    ) </dev/null >/dev/null 2>&1 &
    echo "WATCHDOG=$!" >>"$state"
    psql_opts=(-X -q -v ON_ERROR_STOP=1 -h "$dir" -p "$port" -U postgres)
    if ! { psql "${psql_opts[@]}" -d postgres -c "CREATE DATABASE cairn" &&
           psql "${psql_opts[@]}" -d cairn -c "CREATE EXTENSION postgis"; }; then
      stop_cluster
      exit 1
    fi
    echo "PostgreSQL running on port $port, socket in $dir"
    ;;
  stop)
    [ -f "$state" ] || exit 0
    stop_cluster
    ;;
  *)
    echo "usage: $0 start|stop STATE" >&2
    exit 2
    ;;
esac
