#!/usr/bin/env bash
# Computes pi, e, sqrt2 and ln2 to 3·10^7 and 10^8 decimals, one process each, and prints
# the wall time, the peak resident memory (from /usr/bin/time -v), borel's own memory estimate
# and whether the digits equal Debian python3-mpmath's (testdata/constants-1e8.json, by
# SHA-256) — the figures in the README (issue: wrong digits of pi past 2.97·10^7 decimals).
#
# usage: bench/constants.sh [CONSTANTS [COUNTS]]   default "pi e sqrt2 ln2" "30000000 100000000"
# About 15 minutes and up to 7 GB on two cores.
set -euo pipefail
cd "$(dirname "$0")/.."
CONSTANTS=${1:-pi e sqrt2 ln2}
COUNTS=${2:-30000000 100000000}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
ref=testdata/constants-1e8.json
printf '%-6s %10s %9s %10s %10s  %s\n' constant decimals seconds "peak MB" "est. MB" "digits"
for c in $CONSTANTS; do
  for n in $COUNTS; do
    /usr/bin/time -v "$out/borel" digits "$c" --count "$n" -o "$out/d.txt" 2> "$out/err.txt"
    wall=$(grep -E '^borel: [0-9]+ digits' "$out/err.txt" | sed -E 's/.* in ([0-9.]+) s;.*/\1/')
    peak=$(grep 'Maximum resident' "$out/err.txt" | awk '{printf "%.0f", $NF/1024}')
    # The estimate, from the refusal of a request with a 1 KiB bound (exit status 2).
    est=$( ("$out/borel" digits "$c" --count "$n" --memory 1KiB 2>&1 || true) | sed -nE 's/.*need about ([0-9]+) MiB.*/\1/p')
    got=$(head -c "$n" "$out/d.txt" | sha256sum | cut -d' ' -f1)
    want=$(grep -A 8 "\"$c\"" "$ref" | sed -nE "s/.*\"sha256_$n\": \"([0-9a-f]+)\".*/\1/p")
    if [ -z "$want" ]; then verdict="no reference"; elif [ "$got" = "$want" ]; then verdict="= mpmath"; else verdict="DIFFER from mpmath"; fi
    printf '%-6s %10d %9s %10s %10s  %s\n' "$c" "$n" "$wall" "$peak" "$est" "$verdict"
  done
done
