#!/usr/bin/env bash
# Private PostgreSQL cluster for Tauline: installs Debian's package when missing, creates a cluster in
# a git-ignored folder and runs it on 127.0.0.1 only. PostgreSQL refuses to run as root, so as root
# every command runs as the postgres user; TCP only (-k '') because long socket paths break start-up.
#   scripts/pg.sh start DIR PORT DBNAME   → prints nothing on success; idempotent
#   scripts/pg.sh stop DIR
# wal_level=minimal: a build writes its records into a partition created in its own transaction, which PostgreSQL
# then syncs at commit instead of logging (no streaming replicas on this private cluster; see README, "Scaling out");
# backend_flush_after has the kernel write that partition out during the COPY, so the sync at commit is short.
set -euo pipefail
cmd=${1:?start|stop}; dir=$(realpath -m "${2:?folder}")

find_pgbin() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1; }
PGBIN=$(find_pgbin)
if [ -z "$PGBIN" ] && [ "$cmd" = start ]; then
  echo "PostgreSQL is not installed; installing Debian's postgresql package…" >&2
  if [ "$(id -u)" = 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq >&2
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq postgresql >&2
  PGBIN=$(find_pgbin)
fi
[ -n "$PGBIN" ] || { echo "PostgreSQL binaries not found" >&2; exit 1; }

if [ "$(id -u)" = 0 ]; then
  as_pg() { (cd / && runuser -u postgres -- "$@"); }
  mkdir -p "$(dirname "$dir")"
  # every parent must be traversable by postgres
  p="$dir"; while p=$(dirname "$p"); [ "$p" != "/" ]; do chmod o+x "$p" 2>/dev/null || true; done
  install -d -o postgres -g postgres -m 700 "$dir"
else
  as_pg() { "$@"; }
  mkdir -p "$dir"; chmod 700 "$dir"
fi
data="$dir/data"

case "$cmd" in
  start)
    port=${3:?port}; db=${4:?database name}
    if [ ! -s "$data/PG_VERSION" ]; then
      as_pg "$PGBIN/initdb" -D "$data" -U postgres -A trust -E UTF8 --locale=C.UTF-8 >/dev/null
    fi
    if ! as_pg "$PGBIN/pg_ctl" status -D "$data" >/dev/null 2>&1; then
      as_pg "$PGBIN/pg_ctl" start -D "$data" -w -t 60 -l "$dir/server.log" \
        -o "-k '' -p $port -c listen_addresses=127.0.0.1 -c fsync=${PG_FSYNC:-on} -c max_connections=200 -c wal_level=minimal -c max_wal_senders=0 -c backend_flush_after=2MB" >/dev/null || {
        echo "PostgreSQL in $dir did not start on 127.0.0.1:$port; the end of its log:" >&2
        tail -n 4 "$dir/server.log" >&2
        exit 1
      }
    fi
    as_pg "$PGBIN/psql" -h 127.0.0.1 -p "$port" -U postgres -d postgres -tAc \
      "select 1 from pg_database where datname='$db'" | grep -q 1 \
      || as_pg "$PGBIN/createdb" -h 127.0.0.1 -p "$port" -U postgres "$db"
    ;;
  stop)
    if [ -s "$data/PG_VERSION" ] && as_pg "$PGBIN/pg_ctl" status -D "$data" >/dev/null 2>&1; then
      as_pg "$PGBIN/pg_ctl" stop -D "$data" -m fast -w >/dev/null
    fi
    ;;
  *) echo "usage: pg.sh start DIR PORT DB | stop DIR" >&2; exit 2 ;;
esac
