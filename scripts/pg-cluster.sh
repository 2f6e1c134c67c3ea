#!/usr/bin/env bash
# A throw-away PostgreSQL cluster for the test suite's PostgreSQL pass, in CI and by hand:
#
#   scripts/pg-cluster.sh start DIR [PORT]   initdb in DIR/data, start on 127.0.0.1:PORT (default
#                                            55433), create the database castellan_test, and print
#                                            its URL (the TEST_DATABASE_URL to use)
#   scripts/pg-cluster.sh stop DIR           stop it; DIR can be deleted afterwards
#
# The cluster is made the way Castellan wants its production databases: no locale (C collation,
# text sorted and compared bytewise, as SQLite does), UTF-8, trust auth for the user `castellan`
# on 127.0.0.1 only, fsync off because nothing in it is worth keeping, and room for 300 connections
# (test files leave idle pools behind until pg's idle timeout closes them). It uses the binaries of
# Debian's `postgresql` package (/usr/lib/postgresql/<version>/bin; PG_BINDIR overrides). initdb
# refuses to run as root, so as root the server runs as the `postgres` system user the package
# creates.
set -euo pipefail

usage() {
	echo "Usage: $0 start DIR [PORT] | stop DIR" >&2
	exit 2
}

command=${1:-}
dir=${2:-}
[[ -n $command && -n $dir ]] || usage
dir=$(realpath -m "$dir")

bindir=${PG_BINDIR:-$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)}
if [[ ! -x $bindir/initdb ]]; then
	echo "PostgreSQL's server binaries are missing: install Debian's postgresql package (apt-get install postgresql) or set PG_BINDIR." >&2
	exit 1
fi

as_owner() {
	if [[ $(id -u) == 0 ]]; then runuser -u postgres -- "$@"; else "$@"; fi
}

case $command in
start)
	port=${3:-55433}
	mkdir -p "$dir"
	if [[ $(id -u) == 0 ]]; then chown postgres: "$dir"; fi
	# The server's user may not be allowed into the caller's folder (root's checkout).
	cd "$dir"
	as_owner "$bindir/initdb" --no-locale -E UTF8 -A trust -U castellan -D "$dir/data" >"$dir/initdb.log"
	as_owner "$bindir/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -o \
		"-p $port -k $dir -c listen_addresses=127.0.0.1 -c max_connections=300 -c fsync=off -c synchronous_commit=off -c full_page_writes=off" \
		start >/dev/null
	"$bindir/createdb" -h 127.0.0.1 -p "$port" -U castellan castellan_test
	echo "postgres://castellan@127.0.0.1:$port/castellan_test"
	;;
stop)
	if [[ -f $dir/data/postmaster.pid ]]; then
		cd "$dir"
		as_owner "$bindir/pg_ctl" -D "$dir/data" -m fast -w stop >/dev/null
	fi
	;;
*)
	usage
	;;
esac
