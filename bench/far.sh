#!/usr/bin/env bash
# Digits far out: hexadecimal digits of π by digit extraction at positions 10^6 … 10^9 (10^10 with
# FAR_MAX=10), each timed and compared with the published table (Bailey, Borwein & Plouffe 1997,
# the hex digits of π beginning at position 10^d + 1, as recalled from the paper; 10^6 and 10^7 are
# also confirmed by Debian's python3-mpmath in stats/expand/far_test.go).
# Usage: bench/far.sh   (from the repository root; FAR_MAX=8 stops at 10^8)
set -euo pipefail
cd "$(dirname "$0")/.."
go build -o /tmp/borel-far ./cmd/borel
max=${FAR_MAX:-9}
declare -A table=(
  [6]=26c65e52cb4593 [7]=17af5863efed8d [8]=ecb840e21926ec [9]=85895585a0428b [10]=921c73c6838fb2
)
printf '%-10s %-16s %-16s %9s  %s\n' position borel published seconds agree
fail=0
for d in $(seq 6 "$max"); do
  offset=$(( 10**d - 1 ))
  start=$(date +%s.%N)
  got=$(/tmp/borel-far digits pi --base 16 --offset "$offset" --count 14 --quiet)
  secs=$(echo "$(date +%s.%N) - $start" | bc)
  ok=yes
  [ "$got" = "${table[$d]}" ] || { ok=NO; fail=1; }
  printf '10^%-7s %-16s %-16s %9.1f  %s\n' "$d" "$got" "${table[$d]}" "$secs" "$ok"
done
echo "($(nproc) cores; $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | xargs))"
exit $fail
