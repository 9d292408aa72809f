#!/usr/bin/env bash
# Runs a command against a throwaway PostgreSQL cluster: initdb in a temp folder, a server on a unix socket only
# (no TCP port to collide with), TEST_DATABASE_URL and DATABASE_URL pointing at it, and the cluster stopped and
# removed afterwards, also when the command fails. With TEST_DATABASE_URL already set, the command just runs.
#   scripts/with-postgres.sh npx vitest run --project integration
set -euo pipefail

if [ -n "${TEST_DATABASE_URL:-}" ]; then
  export DATABASE_URL="${DATABASE_URL:-$TEST_DATABASE_URL}"
  exec "$@"
fi

PGBIN="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)"
if [ -z "$PGBIN" ] || [ ! -x "$PGBIN/initdb" ]; then
  echo "PostgreSQL's server is not installed (Debian: apt-get install -y postgresql)." >&2
  exit 1
fi

tmp="$(mktemp -d /tmp/pacewright-pg-XXXXXX)"
as_owner=()
user="$(id -un)"
# initdb refuses to run as root: the cluster then belongs to Debian's postgres user.
if [ "$(id -u)" = 0 ]; then
  chown postgres "$tmp"
  as_owner=(runuser -u postgres --)
  user=postgres
fi

stop() {
  "${as_owner[@]}" "$PGBIN/pg_ctl" -D "$tmp/data" -m immediate stop >/dev/null 2>&1 || true
  rm -rf "$tmp"
}
trap stop EXIT

"${as_owner[@]}" "$PGBIN/initdb" -D "$tmp/data" -A trust -U "$user" -E UTF8 --no-sync >"$tmp/initdb.log" 2>&1 ||
  { cat "$tmp/initdb.log" >&2; exit 1; }
"${as_owner[@]}" "$PGBIN/pg_ctl" -D "$tmp/data" -w -l "$tmp/server.log" \
  -o "-k $tmp -c listen_addresses='' -c fsync=off -c max_connections=200" start >/dev/null ||
  { cat "$tmp/server.log" >&2; exit 1; }

export TEST_DATABASE_URL="postgres://$user@localhost/postgres?host=$tmp"
export DATABASE_URL="$TEST_DATABASE_URL"
echo "[pg] throwaway cluster on $tmp"
set +e
"$@"
code=$?
set -e
exit $code
