#!/usr/bin/env bash
# Cost of the word-level checks (issue: word-aware structure checks).
#
# usage: bench/words.sh [BYTES [REPEATS [WORD]]]   defaults 100000000, 3, 32
#
# Writes BYTES of ChaCha8 output (borel digits chacha8:…, base 256 bytes), then audits it with
# --raw and with --raw --word WORD, alternating the two REPEATS times, and prints each run's
# wall time and peak memory, the best of each, and their ratio (the target: at most 1.5).
# lincomp, the quadratic one, tests the first 8 segments of 10^5 words and every 32nd.
set -euo pipefail
cd "$(dirname "$0")/.."
N=${1:-100000000}
R=${2:-3}
W=${3:-32}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
B="$out/borel"
"$B" digits chacha8:16 --base 256 --count "$N" -q -o "$out/data.bin"
run() { # run LABEL ARGS...: prints "seconds KB"
  /usr/bin/time -f "%e %M" "$B" audit "$out/data.bin" --raw -q "$@" > /dev/null 2> "$out/t" || { cat "$out/t"; exit 1; }
  tail -1 "$out/t"
}
best_raw=1e9 best_word=1e9
for i in $(seq 1 "$R"); do
  read -r s kb < <(run)
  printf 'raw            run %d: %6.2f s, peak %6d MB\n' "$i" "$s" $(( kb / 1024 ))
  best_raw=$(awk -v a="$best_raw" -v b="$s" 'BEGIN{print (b<a)?b:a}')
  read -r s kb < <(run --word "$W")
  printf 'raw --word %-3d run %d: %6.2f s, peak %6d MB\n' "$W" "$i" "$s" $(( kb / 1024 ))
  best_word=$(awk -v a="$best_word" -v b="$s" 'BEGIN{print (b<a)?b:a}')
done
awk -v r="$best_raw" -v w="$best_word" -v n="$N" 'BEGIN{printf "best of each: --raw %.2f s, --raw --word %.2f s; ratio %.2f (target ≤ 1.5) on %d bytes\n", r, w, w/r, n}'
