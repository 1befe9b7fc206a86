#!/usr/bin/env bash
# Exit codes and messages of the runner for each class of error (README, "The emberlith command").
# Usage: check_exit_codes.sh EMBERLITH SCENARIO WORKDIR
set -uo pipefail
emberlith="$1"; scenario="$2"; work="$3/exit-codes"
mkdir -p "$work"; fails=0
expect() { # CODE PATTERN -- command...
  local code="$1" pattern="$2"; shift 3
  local out; out=$("$@" 2>&1); local rc=$?
  if [ "$rc" -eq "$code" ] && grep -q -- "$pattern" <<<"$out"; then echo "ok   exit $rc: $pattern"
  else echo "FAIL expected exit $code and '$pattern', got $rc: $out"; fails=$((fails + 1)); fi
}
rocks="$(cd "$(dirname "$scenario")/../../example-data" && pwd)/rocks.yaml"
copy() { sed "s|rocks: ../../example-data/rocks.yaml|rocks: $rocks|; $1" "$scenario" > "$work/$2"; }
copy 's/temperature: 1150/temperture: 1150/' typo.yaml
expect 2 "typo.yaml:15:5: bodies\[0\].temperture: unknown key" -- "$emberlith" check "$work/typo.yaml"
copy 's/thickness: 20/thickness: -20/' negative.yaml
expect 2 "thickness" -- "$emberlith" run "$work/negative.yaml" -o "$work/out" -q
expect 2 "not an Emberlith result folder" -- "$emberlith" describe "$work"
expect 2 "scenario is required" -- "$emberlith" run
expect 3 "exists; choose another folder" -- "$emberlith" run "$scenario" -o "$work/.." -q
[ ! -e "$work/out" ] || { echo "FAIL a failed run left $work/out"; fails=$((fails + 1)); }
exit $fails
