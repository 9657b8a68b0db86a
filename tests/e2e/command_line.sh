#!/bin/sh
# pbfleetd's command line as an operator or a service manager meets it:
# help exits 0 on stdout; an unknown flag, a missing value or a value out of
# range exits 2 (usage) naming the problem on stderr, and starts nothing.
# Usage: command_line.sh PATH/TO/pbfleetd
set -u
daemon=$1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail() { echo "FAIL: $*" >&2; exit 1; }

# run EXPECTED_EXIT ARGS...: stdout to $tmp/out, stderr to $tmp/err
run() {
  expected=$1; shift
  timeout 10 "$daemon" "$@" >"$tmp/out" 2>"$tmp/err"
  code=$?
  [ "$code" -eq "$expected" ] || { cat "$tmp/out" "$tmp/err" >&2; fail "pbfleetd $* exited $code, expected $expected"; }
}

run 0 --help
grep -q -- "--init-admin-token" "$tmp/out" || fail "--help does not list --init-admin-token"

run 2 --no-such-flag
grep -q -- "--no-such-flag" "$tmp/err" || fail "an unknown flag is not named on stderr"

run 2 --db
grep -qi "db" "$tmp/err" || fail "a missing value is not named on stderr"

run 2 token create --role crew --expires-in 0 --db "$tmp/x.db"
grep -q -- "--expires-in" "$tmp/err" || fail "an out-of-range --expires-in is not named on stderr"
[ ! -e "$tmp/x.db" ] || fail "a refused command line created the database"

run 2 token
echo "ok"
