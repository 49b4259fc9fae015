#!/usr/bin/env bash
# Times `borel digits pi` and `borel rebase` against the reference tools on this machine
# and prints the ratios (issue: digits of constants in any base).
#
# usage: bench/digits.sh [N [RUNS]]   N decimal digits of pi (default 10000000), best of RUNS
#                                    runs of every command (default 3: a shared machine is noisy)
#
# References, used when installed (Debian: apt-get install python3-mpmath python3-gmpy2 pari-gp):
#   mpmath (with gmpy2)  mpmath.mp.dps = N; str(mpmath.pi)
#   PARI/GP              default(realprecision, N); Pi
#   gmpy2 (rebase)       parse N decimals with mpz(s, 10), then .digits(3)
set -euo pipefail
cd "$(dirname "$0")/.."
N=${1:-10000000}
RUNS=${2:-3}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel

. bench/timing.sh

b=$(secs "$out/borel" digits pi --count "$N" -q -o "$out/pi.txt")
printf 'best of %d runs each\nborel digits pi, %d decimals: %.2f s\n' "$RUNS" "$N" "$b"
if /usr/bin/python3 -c 'import mpmath, gmpy2' 2>/dev/null; then
  m=$(secs /usr/bin/python3 -c "import mpmath; mpmath.mp.dps = $N + 10; s = str(mpmath.pi)")
  printf 'mpmath (gmpy2):             %.2f s   borel/mpmath = %s\n' "$m" "$(ratio "$b" "$m")"
else
  echo "mpmath with gmpy2 not installed: skipped"
fi
if command -v gp > /dev/null; then
  g=$(secs sh -c "echo 'default(realprecision, $N); s = Str(Pi);' | gp -q -s 2G")
  printf 'PARI/GP:                    %.2f s   borel/pari = %s\n' "$g" "$(ratio "$b" "$g")"
else
  echo "pari-gp not installed: skipped"
fi

r=$(secs "$out/borel" rebase --from 10 --to 3 "$out/pi.txt" -q -o "$out/pi3.txt")
printf 'borel rebase 10 -> 3, %d decimals: %.2f s\n' "$N" "$r"
if /usr/bin/python3 -c 'import gmpy2' 2>/dev/null; then
  p=$(secs /usr/bin/python3 -c "
import gmpy2
s = open('$out/pi.txt').read().strip()
v = gmpy2.mpz(s, 10)
t = v.digits(3)")
  printf 'gmpy2 parse + convert:      %.2f s   borel/gmpy2 = %s\n' "$p" "$(ratio "$r" "$p")"
fi
