#!/usr/bin/env bash
# Slabwright's own PostgreSQL: Debian's server binaries, our own cluster, loopback only.
#
#   scripts/pg.sh start            install when missing, create the cluster on first run, start, wait
#   scripts/pg.sh stop             stop cleanly (fast shutdown), if running
#   scripts/pg.sh status           exit 0 when running, 3 when not
#   scripts/pg.sh ensure-db NAME   create database NAME when missing
#   scripts/pg.sh dir              print the cluster directory in use
#
# Environment: SLAB_PG_PORT (default 54329), SLAB_PG_DIR (cluster directory; default .data/pg, or a
# per-project folder under /tmp when the postgres user cannot reach .data), SLAB_PG_FAST=1 (no fsync,
# for tests), SLAB_PG_PASSWORD_FILE (default .data/pg-password). Safe to re-run; a stale
# postmaster.pid left by a crash is removed.
#
# Authentication: the superuser `postgres` has a random password, made once per installation and
# kept in the password file (mode 0600); TCP connections (the app, on 127.0.0.1) must give it
# (scram-sha-256). Over the Unix socket only the cluster's own OS user gets in (peer), which is how
# this script sets the password. A trust-auth cluster made by an earlier checkout is upgraded in
# place on `start`, running or not.
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
PORT=${SLAB_PG_PORT:-54329}
PWFILE=${SLAB_PG_PASSWORD_FILE:-$ROOT/.data/pg-password}
IS_ROOT=0
[ "$(id -u)" = 0 ] && IS_ROOT=1
# The OS user that owns the cluster: initdb and postgres refuse to run as root.
OWNER=$(id -un)
[ "$IS_ROOT" = 1 ] && OWNER=postgres

say() { printf 'pg: %s\n' "$*" >&2; }
die() { say "$*"; exit 1; }

find_bindir() {
  local d
  for d in $(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -t/ -k4 -n -r); do
    [ -x "$d/initdb" ] && [ -x "$d/pg_ctl" ] && { echo "$d"; return 0; }
  done
  return 1
}

ensure_installed() {
  if BINDIR=$(find_bindir); then return 0; fi
  say "PostgreSQL server not found; installing Debian's package (postgresql)…"
  if [ "$IS_ROOT" != 1 ] || ! command -v apt-get >/dev/null 2>&1; then
    die "cannot install PostgreSQL here: run 'apt-get install postgresql' as root (Debian), or set DATABASE_URL to a server you run."
  fi
  # Debian's package tries to start its own cluster on 5432; we do not use it, so keep it from starting.
  local blocked=0
  if [ ! -e /usr/sbin/policy-rc.d ]; then
    printf '#!/bin/sh\nexit 101\n' > /usr/sbin/policy-rc.d && chmod +x /usr/sbin/policy-rc.d && blocked=1
  fi
  { DEBIAN_FRONTEND=noninteractive apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null; } \
    || { [ "$blocked" = 1 ] && rm -f /usr/sbin/policy-rc.d; die "apt-get could not install postgresql (see the messages above)."; }
  [ "$blocked" = 1 ] && rm -f /usr/sbin/policy-rc.d
  BINDIR=$(find_bindir) || die "postgresql installed, but no server binaries under /usr/lib/postgresql/*/bin."
}

# Run a command as the cluster's owner: initdb and postgres refuse to run as root.
as_owner() {
  # From /, since the postgres user may not be able to enter the project's folder.
  if [ "$IS_ROOT" = 1 ]; then (cd / && runuser -u postgres -- "$@"); else "$@"; fi
}

pick_dir() {
  if [ -n "${SLAB_PG_DIR:-}" ]; then PGDIR=$SLAB_PG_DIR; return; fi
  PGDIR="$ROOT/.data/pg"
  if [ "$IS_ROOT" = 1 ]; then
    mkdir -p "$ROOT/.data"
    # The postgres user must be able to traverse every parent of the cluster directory.
    if ! runuser -u postgres -- test -x "$ROOT/.data" 2>/dev/null || ! runuser -u postgres -- test -x "$ROOT" 2>/dev/null; then
      local tag
      tag=$(printf '%s' "$ROOT" | sha1sum | cut -c1-12)
      PGDIR="/tmp/slabwright-$tag/pg"
    fi
  fi
}

socket_dir() { echo "/tmp/slabwright-pg-$PORT"; }
log_file() { echo "$(dirname "$PGDIR")/postgres-$PORT.log"; }

# The cluster's password: made once (24 random bytes, hex) and kept, mode 0600.
ensure_password() {
  if [ ! -s "$PWFILE" ]; then
    mkdir -p "$(dirname "$PWFILE")"
    (umask 077 && od -An -tx1 -N24 /dev/urandom | tr -d ' \n' > "$PWFILE.$$" && mv "$PWFILE.$$" "$PWFILE")
    say "made a password for the database superuser in $PWFILE"
  fi
  chmod 600 "$PWFILE"
  PASSWORD=$(tr -d ' \r\n' < "$PWFILE")
  [[ "$PASSWORD" =~ ^[A-Za-z0-9_-]{16,}$ ]] || die "$PWFILE must hold one password of at least 16 letters, digits, - or _"
}

HBA_MARK="# Slabwright (scripts/pg.sh): a password over TCP, only the cluster's owner over the socket"

auth_files_current() {
  grep -qxF "$HBA_MARK" "$PGDIR/pg_hba.conf" 2>/dev/null && grep -q "^slab_owner[[:space:]]" "$PGDIR/pg_ident.conf" 2>/dev/null
}

# pg_hba.conf and pg_ident.conf as we want them (written in place, so they keep their owner).
write_auth_files() {
  printf '%s\n%s\n%s\n%s\n' "$HBA_MARK" \
    "local   all   all                  peer map=slab_owner" \
    "host    all   all   127.0.0.1/32   scram-sha-256" \
    "host    all   all   ::1/128        scram-sha-256" > "$PGDIR/pg_hba.conf"
  printf '# MAPNAME     SYSTEM-USERNAME   PG-USERNAME\nslab_owner    %s    postgres\n' "$OWNER" > "$PGDIR/pg_ident.conf"
  if [ "$IS_ROOT" = 1 ]; then chown postgres:postgres "$PGDIR/pg_hba.conf" "$PGDIR/pg_ident.conf"; fi
  chmod 600 "$PGDIR/pg_hba.conf" "$PGDIR/pg_ident.conf"
}

# psql as the cluster's owner over the Unix socket (peer authentication, no password).
owner_psql() {
  as_owner "$BINDIR/psql" -X -q -v ON_ERROR_STOP=1 -h "$(socket_dir)" -p "$PORT" -U postgres -d postgres "$@"
}

# Give the superuser the password in $PWFILE (sent on stdin, so it never shows in a process list).
set_password() {
  printf "alter role postgres with password '%s';\n" "$PASSWORD" | owner_psql >/dev/null \
    || die "could not set the database password"
}

ensure_cluster() {
  [ -f "$PGDIR/PG_VERSION" ] && return 0
  say "creating a new cluster in $PGDIR"
  local parent pwcopy
  parent=$(dirname "$PGDIR")
  mkdir -p "$parent"
  if [ "$IS_ROOT" = 1 ]; then
    chmod 755 "$parent"
    mkdir -p "$PGDIR" && chown postgres:postgres "$PGDIR" && chmod 700 "$PGDIR"
    touch "$(log_file)" && chown postgres:postgres "$(log_file)"
  fi
  # initdb reads the password from a file its (postgres) user can read: a private copy, removed after.
  pwcopy=$(mktemp "$parent/.pwfile.XXXXXX")
  printf '%s\n' "$PASSWORD" > "$pwcopy"
  [ "$IS_ROOT" = 1 ] && chown postgres:postgres "$pwcopy"
  if ! as_owner "$BINDIR/initdb" -D "$PGDIR" --auth-local=peer --auth-host=scram-sha-256 --pwfile="$pwcopy" -E UTF8 --locale=C.UTF-8 -U postgres >/dev/null; then
    rm -f "$pwcopy"
    die "initdb failed for $PGDIR"
  fi
  rm -f "$pwcopy"
  write_auth_files
}

# A live postgres process (a killed postmaster may linger as a zombie where nothing reaps it).
is_live_postgres() {
  local pid=$1 comm state
  [[ "$pid" =~ ^[0-9]+$ ]] || return 1
  [ -r "/proc/$pid/comm" ] || return 1
  comm=$(cat "/proc/$pid/comm" 2>/dev/null || true)
  [[ "$comm" == postgres* ]] || return 1
  state=$(awk '{print $3}' "/proc/$pid/stat" 2>/dev/null || echo Z)
  [ "$state" != Z ] && [ "$state" != X ]
}

# Running means: a postmaster.pid whose first line is the pid of a live postgres process.
is_running() {
  [ -f "$PGDIR/postmaster.pid" ] || return 1
  is_live_postgres "$(head -n 1 "$PGDIR/postmaster.pid" 2>/dev/null || true)"
}

# After a crash the socket's lock file still names the dead postmaster; postgres refuses to start over it.
clear_stale_socket() {
  local lock="$1/.s.PGSQL.$PORT.lock"
  [ -f "$lock" ] || return 0
  if ! is_live_postgres "$(head -n 1 "$lock" 2>/dev/null || true)"; then
    rm -f "$lock" "$1/.s.PGSQL.$PORT"
  fi
}

wait_ready() {
  local i
  for i in $(seq 1 100); do
    if "$BINDIR/pg_isready" -q -h 127.0.0.1 -p "$PORT" -U postgres; then return 0; fi
    sleep 0.1
  done
  return 1
}

cmd_start() {
  ensure_installed
  pick_dir
  ensure_password
  ensure_cluster
  if is_running; then
    wait_ready || die "a server is running in $PGDIR but does not answer on 127.0.0.1:$PORT"
    if ! auth_files_current; then
      # Made by an earlier checkout with trust authentication: password first (trust still lets us
      # in), then the new rules, then reload.
      say "upgrading the running cluster from trust to password authentication"
      set_password
      write_auth_files
      as_owner "$BINDIR/pg_ctl" -D "$PGDIR" reload >/dev/null
    else
      set_password # in step with the password file, should it have been made again
    fi
    say "already running on 127.0.0.1:$PORT ($PGDIR)"
    return 0
  fi
  if ! auth_files_current; then
    say "upgrading the cluster from trust to password authentication"
    write_auth_files
  fi
  if [ -f "$PGDIR/postmaster.pid" ]; then
    say "removing a stale postmaster.pid left by an earlier crash"
    rm -f "$PGDIR/postmaster.pid"
  fi
  local sock opts
  sock=$(socket_dir)
  mkdir -p "$sock"
  clear_stale_socket "$sock"
  [ "$IS_ROOT" = 1 ] && chown postgres:postgres "$sock"
  opts="-c listen_addresses=127.0.0.1 -p $PORT -k $sock"
  if [ "${SLAB_PG_FAST:-0}" = 1 ]; then
    opts="$opts -c fsync=off -c synchronous_commit=off -c full_page_writes=off"
  fi
  if [ "$IS_ROOT" = 1 ]; then touch "$(log_file)"; chown postgres:postgres "$(log_file)"; fi
  if ! as_owner "$BINDIR/pg_ctl" -D "$PGDIR" -l "$(log_file)" -w -t 60 -o "$opts" start >/dev/null; then
    say "PostgreSQL did not start; the end of its log:"
    tail -n 15 "$(log_file)" >&2 || true
    exit 1
  fi
  wait_ready || die "PostgreSQL started but does not accept connections on 127.0.0.1:$PORT"
  set_password
  say "started on 127.0.0.1:$PORT ($PGDIR)"
}

cmd_stop() {
  BINDIR=$(find_bindir) || { say "not installed; nothing to stop"; return 0; }
  pick_dir
  if ! is_running; then say "not running"; return 0; fi
  as_owner "$BINDIR/pg_ctl" -D "$PGDIR" -m fast -w -t 60 stop >/dev/null
  say "stopped"
}

cmd_status() {
  BINDIR=$(find_bindir) || exit 3
  pick_dir
  if is_running; then echo "running on 127.0.0.1:$PORT ($PGDIR)"; exit 0; fi
  echo "not running"; exit 3
}

cmd_ensure_db() {
  local name=${1:?database name}
  [[ "$name" =~ ^[a-z_][a-z0-9_]*$ ]] || die "bad database name: $name"
  BINDIR=$(find_bindir) || die "PostgreSQL is not installed"
  local exists
  exists=$(owner_psql -tAc "select 1 from pg_database where datname = '$name'")
  if [ "$exists" != 1 ]; then
    owner_psql -c "create database $name" >/dev/null
    say "created database $name"
  fi
}

case "${1:-}" in
  start) cmd_start ;;
  stop) cmd_stop ;;
  status) cmd_status ;;
  ensure-db) shift; cmd_ensure_db "$@" ;;
  dir) pick_dir; echo "$PGDIR" ;;
  *) echo "usage: $0 start|stop|status|ensure-db NAME|dir" >&2; exit 2 ;;
esac
