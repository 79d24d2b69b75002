#!/usr/bin/env bash
# CPU time (user + sys, best of N runs) of `background` and `spectrum --formats json` for Palatini Higgs-like
# inflation at large xi against Starobinsky, and the ratios. Not a test: the figures depend on the machine and its load.
# Usage: benchmarks/palatini_speed.sh [path/to/modesolver] (default: the Release build); N=7 runs each by default.
set -euo pipefail
B=${1:-src/ModeSolver.Cli/bin/Release/net10.0/modesolver}
N=${N:-7}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
best() {
  local b=99 t
  for _ in $(seq "$N"); do
    /usr/bin/time -o "$out/time" -f "%U %S" "$B" "$@" >/dev/null 2>&1
    t=$(awk '{print $1 + $2}' "$out/time")
    b=$(awk -v a="$t" -v b="$b" 'BEGIN { print (a < b) ? a : b }')
  done
  echo "$b"
}
ratio() { awk -v a="$1" -v b="$2" 'BEGIN { printf "%.2f", a / b }'; }
bs=$(best background --model starobinsky --quiet)
ss=$(best spectrum --model starobinsky --formats json --out "$out/s" --quiet)
printf "%-26s %10s %8s %10s %8s\n" model "bg [s]" ratio "spec [s]" ratio
printf "%-26s %10s %8s %10s %8s\n" starobinsky "$bs" 1.00 "$ss" 1.00
for xi in 1e6 1e9 1e12; do
  b=$(best background --model higgs-like-palatini --param "xi=$xi" --quiet)
  s=$(best spectrum --model higgs-like-palatini --param "xi=$xi" --formats json --out "$out/s" --quiet)
  printf "%-26s %10s %8s %10s %8s\n" "palatini xi=$xi" "$b" "$(ratio "$b" "$bs")" "$s" "$(ratio "$s" "$ss")"
done
