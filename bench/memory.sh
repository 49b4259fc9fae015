#!/usr/bin/env bash
# Shows that memory is bounded by the count tables, not by the input: audits a file of
# SIZE random decimal digits (default 2000000000, i.e. 2 GB) and prints the peak resident
# memory from /usr/bin/time -v (issue: throughput and scale).
#
# usage: bench/memory.sh [SIZE]
set -euo pipefail
cd "$(dirname "$0")/.."
SIZE=${1:-2000000000}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
chunk=100000000
for (( done=0; done < SIZE; done += chunk )); do
  n=$(( SIZE - done < chunk ? SIZE - done : chunk ))
  "$out/borel" digits "chacha8:$done" --count "$n" -q | tr -d '\n' >> "$out/digits.txt"
done
ls -l "$out/digits.txt"
/usr/bin/time -v "$out/borel" audit "$out/digits.txt" -q -o "$out/report.txt" 2> "$out/time.txt"
grep -E 'Maximum resident|Elapsed' "$out/time.txt"
grep -E '^Verdict|blocks ' "$out/report.txt"
