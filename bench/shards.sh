#!/usr/bin/env bash
# Shards at scale (issue: shards that scale to a thousand machines).
#
# usage: bench/shards.sh [SHARDS [DIGITS_PER_SHARD [K]]]   defaults 100, 10000000, 7
#
# Makes SHARDS × DIGITS_PER_SHARD random decimal digits, tallies each stretch into a shard
# (--max-block K), then merges them flat and as a tree of fan-in 10 (groups merged with --shard,
# then the groups), and audits the whole file directly. Prints each step's wall time and peak
# resident memory, and checks that the three findings tables are identical. Needs about
# SHARDS × DIGITS_PER_SHARD bytes of disk for the digits and 21 MB a shard at K = 7.
#
# The simulation of a thousand machines (1000 shards of 10^9 digits: tables of the same size,
# counts a hundred times larger) is the Go benchmark BenchmarkFoldShards in internal/tally:
#   go test ./internal/tally -run XXX -bench FoldShards -benchtime 1x
set -euo pipefail
cd "$(dirname "$0")/.."
S=${1:-100}
N=${2:-10000000}
K=${3:-7}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
B="$out/borel"
"$B" digits chacha8:2026 --count $(( S * N )) -q -o "$out/digits.nl"
tr -d '\n' < "$out/digits.nl" > "$out/digits.txt"
rm "$out/digits.nl"

measure() { # measure LABEL CMD...: wall time and peak memory of CMD
  local label=$1; shift
  /usr/bin/time -f "$label: %e s, peak %M KB" "$@" > "$out/last.out" 2> "$out/time.err" || { cat "$out/time.err"; exit 1; }
  tail -1 "$out/time.err"
}

t0=$(date +%s.%N)
for i in $(seq 0 $(( S - 1 ))); do
  dd if="$out/digits.txt" bs=1M iflag=skip_bytes,count_bytes skip=$(( i * N )) count="$N" status=none |
    "$B" tally - --offset $(( i * N )) --max-block "$K" --workers 1 -q -o "$out/part$i.shard"
done
t1=$(date +%s.%N)
printf 'tally: %d shards of %d digits in %.1f s (%.2f s a shard, one worker each), %s a shard\n' \
  "$S" "$N" "$(echo "$t1 - $t0" | bc -l)" "$(echo "($t1 - $t0) / $S" | bc -l)" "$(du -h "$out/part0.shard" | cut -f1)"

measure "flat merge of $S shards" "$B" merge $(seq -f "$out/part%g.shard" 0 $(( S - 1 ))) -q
sed -n '/┌/,/┘/p' "$out/last.out" > "$out/flat.tbl"

groups=$(( (S + 9) / 10 ))
t0=$(date +%s.%N)
for g in $(seq 0 $(( groups - 1 ))); do
  last=$(( g * 10 + 9 < S - 1 ? g * 10 + 9 : S - 1 ))
  "$B" merge $(seq -f "$out/part%g.shard" $(( g * 10 )) "$last") -q --shard "$out/group$g.shard"
done
t1=$(date +%s.%N)
printf 'tree, first level: %d merges of up to 10 shards in %.1f s\n' "$groups" "$(echo "$t1 - $t0" | bc -l)"
measure "tree, final merge of $groups groups" "$B" merge $(seq -f "$out/group%g.shard" 0 $(( groups - 1 ))) -q
sed -n '/┌/,/┘/p' "$out/last.out" > "$out/tree.tbl"

measure "direct audit of the $(( S * N )) digits" "$B" audit "$out/digits.txt" --max-block "$K" -q
sed -n '/┌/,/┘/p' "$out/last.out" > "$out/direct.tbl"

if cmp -s "$out/flat.tbl" "$out/direct.tbl" && cmp -s "$out/tree.tbl" "$out/direct.tbl"; then
  echo "findings: flat, tree and direct identical"
else
  echo "findings differ" >&2
  diff "$out/flat.tbl" "$out/direct.tbl" >&2 || true
  exit 1
fi
