#!/bin/sh
# Runs the pbfleet binary as a script would and checks exit codes, which
# stream the output went to, and the keys and values of estimate --json.
# Usage: binary_checks.sh CHECK PATH/TO/pbfleet
set -u
check=$1
pbfleet=$2
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
# A private config directory, so no user's settings leak in.
export XDG_CONFIG_HOME="$tmp/config" HOME="$tmp" NO_COLOR=1
unset PBFLEET_URL PBFLEET_TOKEN

fail() { echo "FAIL: $*" >&2; exit 1; }

# run EXPECTED_EXIT ARGS...: stdout to $tmp/out, stderr to $tmp/err
run() {
  expected=$1; shift
  "$pbfleet" "$@" >"$tmp/out" 2>"$tmp/err"
  code=$?
  [ "$code" -eq "$expected" ] || { cat "$tmp/err" >&2; fail "pbfleet $* exited $code, expected $expected"; }
}

# json_check PYTHON_EXPRESSION: evaluated with j = the parsed stdout
json_check() {
  python3 -c "import json,sys; j=json.load(open('$tmp/out')); sys.exit(0 if ($1) else 1)" ||
    { cat "$tmp/out" >&2; fail "JSON check failed: $1"; }
}

case $check in
help)
  run 0 --help
  grep -q "estimate" "$tmp/out" || fail "--help does not list estimate"
  grep -q "Exit codes" "$tmp/out" || fail "--help does not document exit codes"
  [ ! -s "$tmp/err" ] || fail "--help wrote to stderr"
  for cmd in estimate log import history winter sulfation replacements overdue connect \
             "depot add" "depot list" "vehicle add" "vehicle list" "battery add" "battery list" \
             "battery show" "battery fit" "battery retire" "token add" "token list" "token revoke"; do
    # shellcheck disable=SC2086 # word splitting of "battery add" is intended
    run 0 $cmd --help
    grep -q "Example" "$tmp/out" || fail "pbfleet $cmd --help has no example"
  done
  ;;
version)
  run 0 --version
  grep -Eq '^pbfleet [0-9]+\.[0-9]+\.[0-9]+$' "$tmp/out" || fail "unexpected version line: $(cat "$tmp/out")"
  ;;
usage_error)
  run 2 frobnicate
  run 2 estimate                      # no readings given
  run 2 estimate --sg                 # option without its value
  run 2 estimate --sg 1.2 --cell-sg 1.2,1.2   # both forms at once
  run 2 --color sometimes estimate --sg 1.2
  [ ! -s "$tmp/out" ] || fail "a usage error printed to stdout"
  grep -q "error" "$tmp/err" || fail "a usage error printed no error message"
  ;;
estimate_json)
  # SG 1.250 at 25 C: published values to check against, with tolerances
  # wider than the spread between sources.
  run 0 estimate --sg 1.250 --temp 25C --json
  json_check "all(k in j for k in ['corrected_sg','acid_molality','acid_wt_percent','cell_emf_v','ocv_model_v','soc_percent','freeze_point_c'])"
  json_check "abs(j['corrected_sg'] - 1.250) < 0.001"
  # CRC Handbook 102nd ed., concentrative properties of aqueous solutions:
  # 34 wt % H2SO4 has rho20/rho_w20 = 1.2540, so SG 1.250 is about 33.5-34 wt %.
  json_check "abs(j['acid_wt_percent'] - 33.7) < 1.0"
  # Molality identity m = 1000 w / (98.079 (1 - w)) at 33.7 wt % = 5.18 mol/kg.
  json_check "abs(j['acid_molality'] - 5.18) < 0.25"
  # Bode, Lead-Acid Batteries (1977), measured cell fit: 2.096 V at 5.18 mol/kg.
  json_check "abs(j['cell_emf_v'] - 2.096) < 0.015"
  json_check "abs(j['ocv_model_v'] - 6 * j['cell_emf_v']) < 0.001"
  # US Army TM 5-1185 freezing table: SG 1.250 freezes at -62 F (-52.2 C).
  json_check "abs(j['freeze_point_c'] - (-52.2)) < 4.0"
  # No OCV, one SG value, no rating: the conditional keys stay out.
  json_check "'soc_from_ocv_percent' not in j and 'cell_spread' not in j and 'available_cca' not in j"

  # US Army TM 5-4210 SOC table (flooded, 80 F): SG 1.225 is 75 %.
  run 0 estimate --sg 1.225 --temp 26.7C --json
  json_check "abs(j['soc_percent'] - 75) < 8"

  run 0 estimate --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --ocv 12.41 --rest-hours 12 --temp 41F \
      --rated-cca 800 --low -25C --engine diesel --displacement-l 7.7 --json
  json_check "j['weak_cell'] == 4"                    # the 1.190 cell, 1-based
  json_check "abs(j['cell_spread'] - 0.060) < 0.002"  # 1.250 - 1.190, same temperature for all cells
  json_check "isinstance(j['soc_from_ocv_percent'], (int, float))"
  # Common-practice OCV table (12.45 V = 75 %, 12.24 V = 50 %): 12.41 V lies between.
  json_check "50 <= j['soc_from_ocv_percent'] <= 80"
  json_check "isinstance(j['available_cca'], (int, float)) and isinstance(j['crank_margin'], (int, float))"
  # SAE J537 rates CCA fully charged at -18 C (0 F); colder (-25 C) and at
  # part charge the battery must deliver less than its rating.
  json_check "0 < j['available_cca'] < 800"
  json_check "abs(j['crank_margin'] - j['available_cca'] / j['required_cca_at_low']) < 0.01"
  ;;
estimate_rejected)
  run 3 estimate --sg 1.9 --temp 20C
  grep -q -- "--sg" "$tmp/err" || fail "the error does not name --sg: $(cat "$tmp/err")"
  grep -q "allowed" "$tmp/err" || fail "the error does not give the allowed range"
  [ ! -s "$tmp/out" ] || fail "a rejected estimate printed a result"
  run 3 estimate --sg 1.250 --temp 150C
  grep -q -- "--temp" "$tmp/err" || fail "the error does not name --temp: $(cat "$tmp/err")"
  run 3 estimate --cell-sg 1.250,1.250,1.250 --cells 6
  grep -q -- "--cell-sg" "$tmp/err" || fail "the error does not name --cell-sg"
  run 3 estimate --sg 1.250 --chemistry plasma
  grep -q "flooded, efb, agm, gel" "$tmp/err" || fail "the error does not list the chemistries"
  ;;
negative_low)
  run 0 estimate --sg 1.250 --low -25C --json
  json_check "abs(j['low_c'] - (-25)) < 1e-9"
  run 0 estimate --sg 1.250 --low -13F --json      # -13 F is -25 C
  json_check "abs(j['low_c'] - (-25)) < 1e-6"
  run 0 estimate --sg 1.250 --temp -5 --json       # bare number means Celsius
  json_check "abs(j['electrolyte_temp_c'] - (-5)) < 1e-9"
  ;;
no_server)
  PBFLEET_URL=http://127.0.0.1:9 run 1 depot list
  grep -q "cannot connect" "$tmp/err" || fail "no clear message when the server is down: $(cat "$tmp/err")"
  run 1 --server https://fleet.invalid depot list
  grep -q "https" "$tmp/err" || fail "https refusal does not say why"
  ;;
token_not_in_help)
  # The token is never a plain flag value, and never printed back.
  run 0 --help
  if grep -Eq -- "--token( |=)" "$tmp/out"; then fail "a --token flag exists"; fi
  PBFLEET_TOKEN=s3cret-token-value run 0 connect --show
  if grep -q "s3cret" "$tmp/out" "$tmp/err"; then fail "connect --show printed the token"; fi
  grep -q "PBFLEET_TOKEN" "$tmp/out" || fail "connect --show does not say where the token comes from"
  ;;
*)
  fail "unknown check $check"
  ;;
esac
echo "ok: $check"
