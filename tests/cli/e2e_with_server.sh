#!/bin/sh
# End to end: the pbfleet CLI against a live pbfleetd on 127.0.0.1 with a
# temporary database. Registers a depot, vehicle and batteries, logs a
# reading, imports good and bad files, and reads every report as text,
# JSON and CSV (parsed and checked).
# Usage: e2e_with_server.sh PATH/TO/pbfleet PATH/TO/pbfleetd
set -u
pbfleet=$1
pbfleetd=$2
tmp=$(mktemp -d)
server_pid=
cleanup() {
  [ -n "$server_pid" ] && kill "$server_pid" 2>/dev/null
  rm -rf "$tmp"
}
trap cleanup EXIT
export XDG_CONFIG_HOME="$tmp/config" HOME="$tmp" NO_COLOR=1 LANG=C.UTF-8
unset PBFLEET_URL PBFLEET_TOKEN

fail() { echo "FAIL: $*" >&2; [ -f "$tmp/server.log" ] && tail -20 "$tmp/server.log" >&2; exit 1; }

# The server stops by itself after 120 s even if this script dies.
timeout 120 "$pbfleetd" --data "$tmp/data" --listen 127.0.0.1:0 --port-file "$tmp/port" \
  --init-admin-token "$tmp/admin.token" >"$tmp/server.log" 2>&1 &
server_pid=$!
i=0
while [ ! -s "$tmp/port" ] || [ ! -s "$tmp/admin.token" ]; do
  i=$((i + 1))
  [ $i -gt 100 ] && fail "pbfleetd did not start"
  sleep 0.1
done
export PBFLEET_URL="http://127.0.0.1:$(cat "$tmp/port")"

# run EXPECTED_EXIT ARGS...: stdout to $tmp/out, stderr to $tmp/err
run() {
  expected=$1; shift
  "$pbfleet" "$@" >"$tmp/out" 2>"$tmp/err"
  code=$?
  [ "$code" -eq "$expected" ] || { cat "$tmp/out" "$tmp/err" >&2; fail "pbfleet $* exited $code, expected $expected"; }
}
json_check() {
  python3 -c "import json,sys; j=json.load(open('$tmp/out')); sys.exit(0 if ($1) else 1)" ||
    { cat "$tmp/out" >&2; fail "JSON check failed: $1"; }
}
csv_check() {
  python3 -c "import csv,sys; r=list(csv.DictReader(open('$tmp/out', newline=''))); sys.exit(0 if ($1) else 1)" ||
    { cat "$tmp/out" >&2; fail "CSV check failed: $1"; }
}
grep_out() { grep -q -- "$1" "$tmp/out" || { cat "$tmp/out" >&2; fail "stdout lacks '$1'"; }; }
grep_err() { grep -q -- "$1" "$tmp/err" || { cat "$tmp/err" >&2; fail "stderr lacks '$1'"; }; }

# Store the connection once; later commands need no flags.
run 0 connect --token-file "$tmp/admin.token" --check
run 0 connect --show
grep_out "token        set (from config file)"
if grep -q "$(cat "$tmp/admin.token")" "$tmp/out"; then fail "connect --show printed the token"; fi

# Register (Fjellvik Transport, fictional demo fleet).
run 0 depot add "North Yard" --time-zone Europe/Oslo --design-low -25C --json
json_check "j['name'] == 'North Yard' and abs(j['design_low_c'] + 25) < 1e-9"
depot=$(python3 -c "import json; print(json.load(open('$tmp/out'))['id'])")
run 0 vehicle add TR-104 --depot "$depot" --engine diesel --displacement-l 7.7 --json
vehicle=$(python3 -c "import json; print(json.load(open('$tmp/out'))['id'])")
run 0 battery add NB-2023-0001 --rated-cca 800 --reserve-min 160 --installed 2023-10-02 --vehicle "$vehicle"
run 0 battery add NB-2023-0002 --chemistry agm --rated-cca 760 --installed 2024-09-15
run 0 battery fit NB-2023-0002 --vehicle "$vehicle"
run 0 battery list --json
json_check "sorted(b['serial'] for b in j) == ['NB-2023-0001', 'NB-2023-0002']"
run 0 battery list --csv
csv_check "len(r) == 2 and r[0]['serial'].startswith('NB-2023-')"
run 0 depot list
grep_out "North Yard"

# Log one reading: immediate feedback and the unsettled-OCV warning.
run 0 log NB-2023-0001 --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --temp 41F --ocv 12.41 --rest-hours 2 \
  --at 2026-11-02T07:10:00Z
grep_out "corrected SG"
grep_out "state of charge"
grep_err "OCV is not settled"
run 0 log NB-2023-0001 --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --temp 41F --ocv 12.41 --rest-hours 2 \
  --at 2026-11-02T07:10:00Z --json
json_check "j['replayed'] == 1"
run 3 log NB-2023-0001 --sg 1.650 --temp 5C
grep_err "1.400"

# Import a good round, then the same round again (nothing stored twice).
cat >"$tmp/round.csv" <<'CSV'
serial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h,logged_by
NB-2023-0001,2026-11-09T07:15:00Z,12.52,1.255;1.250;1.255;1.200;1.255;1.250,39F,14,kari
NB-2023-0001,2026-11-16T07:15:00Z,12.46,1.245;1.240;1.245;1.190;1.245;1.240,3C,16,kari
NB-2023-0002,2026-11-16T07:20:00Z,12.71,,3C,16,kari
CSV
run 0 import "$tmp/round.csv" --dry-run
grep_out "3 rows are valid"
run 0 import "$tmp/round.csv" --json
json_check "j['ok'] and j['stored'] == 3 and j['replayed'] == 0"
run 0 import "$tmp/round.csv" --json
json_check "j['stored'] == 0 and j['replayed'] == 3"

# A bad file: refused locally (range), and refused by the server (unknown serial).
printf 'serial,taken_at,cell_sg,electrolyte_temp\nNB-2023-0001,2026-11-23T07:00:00Z,1.250;1.980,5C\n' >"$tmp/bad.csv"
run 3 import "$tmp/bad.csv"
grep_err "row 1"
printf 'serial,taken_at,ocv_v,rest_h\nNB-2023-0001,2026-11-23T07:00:00Z,12.5,12\nNB-9999-0000,2026-11-23T07:00:00Z,12.5,12\n' >"$tmp/unknown.csv"
run 3 import "$tmp/unknown.csv"
grep_err "row 2"

# History: table, chart, JSON and CSV.
run 0 history NB-2023-0001 --ascii
grep_out "State of charge (%)"
grep_out "2026-11-16"
run 0 history NB-2023-0001 --json
json_check "len(j['readings']) == 3 and all('derived' in r for r in j['readings'])"
run 0 history NB-2023-0001 --csv
csv_check "len(r) == 3 and all(float(x['soc_percent']) > 0 for x in r)"

# Every report, in all three forms.
run 0 winter --low -30C --json
json_check "len(j['batteries']) == 2 and all(abs(b['low_c'] + 30) < 0.01 for b in j['batteries'])"
run 0 winter --low -22F --csv
csv_check "len(r) == 2 and {'serial', 'level'} <= set(r[0])"
run 0 winter
grep_out "NB-2023-0001"
for report in sulfation replacements overdue; do
  run 0 $report --json
  json_check "isinstance(j, dict)"
  run 0 $report --csv
  csv_check "True"
  run 0 $report
done

# Offline estimate and POST /v1/estimate give the same object (same keys,
# same numbers), so scripts can use either.
run 0 estimate --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --ocv 12.41 --rest-hours 2 --temp 5C \
  --rated-cca 800 --low -25C --engine diesel --displacement-l 7.7 --json
python3 - "$PBFLEET_URL" "$tmp/admin.token" "$tmp/out" <<'PY' || fail "pbfleet estimate --json and POST /v1/estimate differ"
import json, sys, urllib.request
url, token_file, cli_out = sys.argv[1:]
body = {"cell_sg": [1.250, 1.245, 1.250, 1.190, 1.250, 1.245], "ocv_v": 12.41, "rest_h": 2,
        "electrolyte_temp_c": 5, "rated_cca_a": 800, "low_c": -25, "engine": "diesel", "displacement_l": 7.7}
req = urllib.request.Request(url + "/v1/estimate", data=json.dumps(body).encode(), method="POST",
                             headers={"Content-Type": "application/json",
                                      "Authorization": "Bearer " + open(token_file).read().strip()})
server = json.load(urllib.request.urlopen(req, timeout=10))
cli = json.load(open(cli_out))
assert sorted(server) == sorted(cli), (sorted(server), sorted(cli))
for k in ("corrected_sg", "soc_percent", "freeze_point_c", "crank_margin", "cell_emf_v"):
    assert abs(server[k] - cli[k]) < 1e-3, (k, server[k], cli[k])
assert server["weak_cell"] == cli["weak_cell"] == 4
PY

# Roles: a crew token logs readings but may not register depots.
run 0 token add "Harbour crew" --role crew --save-to "$tmp/crew.token"
run 0 --token-file "$tmp/crew.token" log NB-2023-0002 --ocv 12.70 --rest-hours 20 --temp 2C
run 1 --token-file "$tmp/crew.token" depot add Harbour --time-zone Europe/Oslo --design-low -12C
grep_err "403"
run 0 token list --json
json_check "len(j) >= 2 and not any('token' in t for t in j)"

echo "ok: e2e with pbfleetd"
