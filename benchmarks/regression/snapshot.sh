#!/usr/bin/env bash
# Runs every demo deck of runs/ (the spectrum decks, not the sweeps) and every catalogue model at its defaults,
# and keeps each run's summary.json under OUT/<name>.json, so that two builds can be compared number by number
# with compare.py. Usage: benchmarks/regression/snapshot.sh OUT [path to ModeSolver.Cli.dll]
# PALATINI_XI="1e6 1e9 1e12" adds higgs-like-palatini at those couplings (model-higgs-like-palatini-xi<value>.json).
set -euo pipefail
out=${1:?usage: snapshot.sh OUT [ModeSolver.Cli.dll]}
root=$(cd "$(dirname "$0")/../.." && pwd)
dll=${2:-}
if [[ -z "$dll" ]]; then
  dotnet build -c Release "$root/src/ModeSolver.Cli" -v q -nologo >/dev/null
  dll="$root/src/ModeSolver.Cli/bin/Release/net10.0/ModeSolver.Cli.dll"
fi
mkdir -p "$out"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
run() { # name, then spectrum arguments
  local name=$1; shift
  if dotnet "$dll" spectrum "$@" --out "$work/$name" --formats json --quiet --threads 1 >"$work/$name.log" 2>&1; then
    cp "$work/$name/summary.json" "$out/$name.json"
  else
    echo "$name: failed: $(tail -1 "$work/$name.log")" | tee "$out/$name.failed"
  fi
}
for deck in "$root"/runs/*.toml; do
  grep -q '^\[sweep' "$deck" && continue
  run "deck-$(basename "$deck" .toml)" "$deck"
done
for id in $(dotnet "$dll" models | awk 'NR>1 && $1 ~ /^[a-z]/ && $2 ~ /^([0-9]+|N)$/ {print $1}'); do
  run "model-$id" --model "$id"
done
for xi in ${PALATINI_XI:-}; do
  run "model-higgs-like-palatini-xi$xi" --model higgs-like-palatini --param "xi=$xi"
done
ls "$out" | wc -l
