#!/usr/bin/env bash
# Times the full default battery against the numpy + scipy reference on the same machine and
# prints the ratios (issue: throughput and scale).
#
# usage: bench/compare.sh [N [RUNS [RAW]]]  N random decimal digits (default 100000000); every
#                                     timing is the best of RUNS runs (default 3), borel and
#                                     the reference alternating, since a shared machine is noisy;
#                                     RAW random bytes (default 100000000) for the --raw line
#
# The reference is ../shared/bench/reference.py (digit frequencies, chi-square, overlapping
# pairs and one gap histogram), run with Debian's /usr/bin/python3 when it has numpy and scipy,
# with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset for this command only.
set -euo pipefail
cd "$(dirname "$0")/.."
N=${1:-100000000}
RUNS=${2:-3}
RAW=${3:-100000000}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
"$out/borel" digits chacha8:2026 --count "$N" -q -o "$out/digits.nl"
tr -d '\n' < "$out/digits.nl" > "$out/digits.txt"

. bench/timing.sh

one=$(secs "$out/borel" audit "$out/digits.txt" --workers 1 -q)
two=$(secs "$out/borel" audit "$out/digits.txt" --workers 2 -q)
printf 'borel audit, %d digits, full default battery: 1 worker %.2f s, 2 workers %.2f s (speed-up %s)\n' \
  "$N" "$one" "$two" "$(ratio "$one" "$two")"
/usr/bin/time -f 'borel peak resident memory: %M KB' "$out/borel" audit "$out/digits.txt" -q > /dev/null

go build -o "$out/histogram" ./bench/histogram
# The battery, the frequency check alone and the bare histogram, alternating.
hs=(); fs=(); bs=()
for _ in $(seq "$RUNS"); do
  hs+=("$(once "$out/histogram" "$out/digits.txt")")
  fs+=("$(once "$out/borel" audit "$out/digits.txt" --checks freq -q)")
  bs+=("$(once "$out/borel" audit "$out/digits.txt" --workers 2 -q)")
done
h=$(best "${hs[@]}"); f=$(best "${fs[@]}"); b=$(best "${bs[@]}")
printf 'frequency check alone %.2f s, bare byte histogram %.2f s: borel runs at %s of its speed\n' \
  "$f" "$h" "$(ratio "$h" "$f")"
printf 'full default battery (2 workers) %.2f s: %s× the bare histogram (target: at most 6×)\n' \
  "$b" "$(ratio "$b" "$h")"

# Raw generator output: the four views (bits, bit pairs, nibbles, bytes) of RAW random bytes.
"$out/borel" digits chacha8:2027 --base 256 --count "$RAW" -q -o "$out/raw.bin"
rh=(); rr=()
for _ in $(seq "$RUNS"); do
  rh+=("$(once "$out/histogram" "$out/raw.bin")")
  rr+=("$(once "$out/borel" audit "$out/raw.bin" --raw --workers 2 -q)")
done
h=$(best "${rh[@]}"); r=$(best "${rr[@]}")
printf 'audit --raw of %d bytes (4 views, 2 workers) %.2f s = %.1f MB/s, bare byte histogram %.2f s: %s× (target: at most 4 s at 10^8 bytes)\n' \
  "$RAW" "$r" "$(echo "$RAW / $r / 1000000" | bc -l)" "$h" "$(ratio "$r" "$h")"

ref=../shared/bench/reference.py
if [ -f "$ref" ] && /usr/bin/python3 -c 'import numpy, scipy' 2>/dev/null; then
  refs=(); bors=(); same=()
  for _ in $(seq "$RUNS"); do
    refs+=("$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE /usr/bin/python3 "$ref" "$out/digits.txt" "$N" |
      /usr/bin/python3 -c 'import json,sys; print(json.load(sys.stdin)["whole_sec"])')")
    bors+=("$(once "$out/borel" audit "$out/digits.txt" --workers 2 -q)")
    same+=("$(once "$out/borel" audit "$out/digits.txt" --workers 2 -q --checks freq,serial,gap --max-block 2)")
  done
  r=$(best "${refs[@]}"); b=$(best "${bors[@]}"); s=$(best "${same[@]}")
  printf 'numpy + scipy reference: %.2f s, borel (2 workers, alternating with it) %.2f s: reference/borel = %s\n' \
    "$r" "$b" "$(ratio "$r" "$b")"
  printf 'the reference'"'"'s statistics only (--checks freq,serial,gap --max-block 2: frequencies, pairs, gaps of\n'
  printf '  every digit): borel %.2f s: reference/borel = %s\n' "$s" "$(ratio "$r" "$s")"
else
  echo "numpy + scipy (or $ref) not available: reference skipped"
fi
