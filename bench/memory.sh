#!/usr/bin/env bash
# Shows that memory is bounded by the count tables, not by the input: writes SIZE random decimal
# digits (default 2000000000, i.e. 2 GB) with borel digits, which streams them, then audits the
# file, and prints the peak resident memory of both from /usr/bin/time -v.
#
# usage: bench/memory.sh [SIZE]
set -euo pipefail
cd "$(dirname "$0")/.."
SIZE=${1:-2000000000}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
# A generator's digits stream to the file in 1 MiB chunks: the peak stays flat however many.
/usr/bin/time -v "$out/borel" digits chacha8:1 --count "$SIZE" -q -o "$out/digits.txt" 2> "$out/time-digits.txt"
echo "borel digits chacha8:1 --count $SIZE:"
grep -E 'Maximum resident|Elapsed' "$out/time-digits.txt"
ls -l "$out/digits.txt"
/usr/bin/time -v "$out/borel" audit "$out/digits.txt" -q -o "$out/report.txt" 2> "$out/time.txt"
grep -E 'Maximum resident|Elapsed' "$out/time.txt"
grep -E '^Verdict|blocks ' "$out/report.txt"
