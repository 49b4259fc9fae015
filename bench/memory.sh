#!/usr/bin/env bash
# Shows that memory is bounded by the count tables, not by the input: writes SIZE random decimal
# digits (default 2000000000, i.e. 2 GB) with borel digits, which streams them, then audits the
# file, and prints the peak resident memory of both from /usr/bin/time -v.
#
# Then the peaks of π to 10^7 decimals (borel, its estimate, mpmath, PARI/GP) and of the rebase
# of 10^7 decimals into base 3 (borel, gmpy2; BIG=1 adds 10^8), with borel over the leanest
# reference (issue: speed II, target at most 2×); a reference that is not installed is skipped.
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

# peak CMD...: the peak resident memory of CMD in MB.
peak() { /usr/bin/time -f '%M' "$@" 2>&1 >/dev/null | tail -1 | awk '{printf "%.0f", $1/1024}'; }
# lean A B...: borel's A over the smallest of the others (skipping empty ones).
lean() { local a=$1 m=""; shift; for x in "$@"; do [ -n "$x" ] && { [ -z "$m" ] || [ "$x" -lt "$m" ]; } && m=$x; done
  [ -n "$m" ] && printf '%.2f' "$(echo "$a / $m" | bc -l)" || echo '–'; }
py=/usr/bin/python3
b=$(peak "$out/borel" digits pi --count 10000000 -q -o "$out/pi7.txt")
est=$( ("$out/borel" digits pi --count 10000000 --memory 1KiB 2>&1 || true) | sed -nE 's/.*need about ([0-9]+) MiB.*/\1/p')
m=""; g=""
$py -c 'import mpmath' 2>/dev/null && m=$(peak $py -c "import mpmath; mpmath.mp.dps = 10000010; s = str(mpmath.pi)")
command -v gp > /dev/null && g=$(echo 'default(realprecision, 10000010); s = Str(Pi);' | peak gp -q -s 1G)
printf 'π to 10^7 decimals: borel %s MB (estimate %s MiB), mpmath %s MB, PARI/GP %s MB: borel ÷ leanest %s\n' \
  "$b" "$est" "${m:-–}" "${g:-–}" "$(lean "$b" "$m" "$g")"
sizes=(10000000); [ "${BIG:-0}" = 1 ] && sizes+=(100000000)
for n in "${sizes[@]}"; do
  [ "$n" = 10000000 ] && f="$out/pi7.txt" || { f="$out/pi8.txt"; "$out/borel" digits pi --count "$n" -q -o "$f"; }
  b=$(peak "$out/borel" rebase --from 10 --to 3 "$f" -q -o "$out/r.txt")
  g=""
  $py -c 'import gmpy2' 2>/dev/null && g=$(peak $py -c "import gmpy2; s = open('$f').read().strip(); t = gmpy2.mpz(s, 10).digits(3)")
  printf 'rebase of %d decimals into base 3: borel %s MB, gmpy2 %s MB: borel ÷ gmpy2 %s\n' "$n" "$b" "${g:-–}" "$(lean "$b" "$g")"
done
