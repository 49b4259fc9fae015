#!/usr/bin/env bash
# Times `borel digits` and `borel rebase` against the reference tools on this machine and prints
# one table with the ratios: each job by borel with both cores and with one (GOMAXPROCS=1), by
# PARI/GP and by mpmath or gmpy2 (the references use one core), and borel's time over the fastest
# reference's. The tools alternate within each round and every figure is the best of RUNS rounds:
# this machine's speed drifts by up to 1.5x from hour to hour, so only times taken side by side
# are compared.
#
# usage: bench/digits.sh [RUNS]   (default 3; BIG=1 adds the rebase of 10^8 decimals)
#
# References, skipped when not installed (Debian: apt-get install pari-gp python3-mpmath python3-gmpy2):
#   PARI/GP   default(realprecision, N); Str(Pi)  (other bases: digits(floor(x*b^N), b))
#   mpmath    mp.dps = N; str(mp.pi)  (other bases: gmpy2's mpz(floor(x*b^N)).digits(b))
#   gmpy2     exact integer sums for Stoneham's constant; mpz(s, 10).digits(3) for the rebase
set -euo pipefail
cd "$(dirname "$0")/.."
RUNS=${1:-3}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
go build -o "$out/borel" ./cmd/borel
B="$out/borel"

. bench/timing.sh

have_gp=0; command -v gp > /dev/null && have_gp=1
have_mp=0; /usr/bin/python3 -c 'import mpmath, gmpy2' 2>/dev/null && have_mp=1
[ "$have_gp" = 1 ] || echo "pari-gp not installed: its column is skipped"
[ "$have_mp" = 1 ] || echo "python3-mpmath with gmpy2 not installed: its column is skipped"

# Inputs the rebase rows read.
"$B" digits pi --count 10000000 -q -o "$out/pi7.txt"
if [ "${BIG:-0}" = 1 ]; then "$B" digits pi --count 100000000 -q -o "$out/pi8.txt"; fi

gp_run() { echo "$1" | gp -q -s 4G > /dev/null; }
py_run() { /usr/bin/python3 -c "$1"; }

# job NAME BORELARGS GPSCRIPT PYSCRIPT: one row (a script may be "-": no such reference).
job() {
  local name=$1 args=$2 gps=$3 pys=$4
  local b2=() b1=() g=() m=()
  for _ in $(seq "$RUNS"); do
    # shellcheck disable=SC2086
    b2+=("$(once "$B" $args -q -o "$out/x")")
    # shellcheck disable=SC2086
    b1+=("$(once env GOMAXPROCS=1 "$B" $args -q -o "$out/x")")
    if [ "$have_gp" = 1 ] && [ "$gps" != - ]; then g+=("$(once gp_run "$gps")"); fi
    if [ "$have_mp" = 1 ] && [ "$pys" != - ]; then m+=("$(once py_run "$pys")"); fi
  done
  local t2 t1 tg=- tm=- fastest=""
  t2=$(best "${b2[@]}"); t1=$(best "${b1[@]}")
  if [ ${#g[@]} -gt 0 ]; then tg=$(best "${g[@]}"); fastest=$tg; fi
  if [ ${#m[@]} -gt 0 ]; then tm=$(best "${m[@]}"); if [ -z "$fastest" ] || [ "$(echo "$tm < $fastest" | bc -l)" = 1 ]; then fastest=$tm; fi; fi
  local r2=- r1=-
  if [ -n "$fastest" ]; then r2=$(ratio "$t2" "$fastest"); r1=$(ratio "$t1" "$fastest"); fi
  fmt() { if [ "$1" = - ]; then echo "–"; else printf '%.2f s' "$1"; fi; }
  printf '| %s | %s | %s | %s | %s | %s | %s |\n' "$name" "$(fmt "$t2")" "$(fmt "$t1")" "$(fmt "$tg")" "$(fmt "$tm")" "$r2" "$r1"
}

# floor(x·b^N) in base b by gmpy2, for mpmath's x at enough precision.
mp_base() { # CONST B N
  echo "import mpmath, gmpy2; mpmath.mp.prec = int($3*$(echo "l($2)/l(2)" | bc -l)) + 64; x = $1; v = gmpy2.mpz(int(mpmath.floor(x * mpmath.mpf($2)**$3))); s = v.digits($2)"
}
gp_base() { # CONST B N
  echo "default(realprecision, ceil($3*log($2)/log(10)) + 20); s = digits(floor($1 * $2^$3), $2);"
}

printf 'best of %d rounds, tools alternating; %s, %d cores\n\n' "$RUNS" "$(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | xargs)" "$(nproc)"
echo '| job | borel, 2 workers | borel, 1 worker | PARI/GP | mpmath / gmpy2 | borel ÷ fastest | 1 worker ÷ fastest |'
echo '|---|---|---|---|---|---|---|'
job "π, base 10, 10^7" "digits pi --count 10000000" "default(realprecision, 10000010); s = Str(Pi);" "import mpmath; mpmath.mp.dps = 10000010; s = str(mpmath.pi)"
job "π, base 10, 10^6" "digits pi --count 1000000" "default(realprecision, 1000010); s = Str(Pi);" "import mpmath; mpmath.mp.dps = 1000010; s = str(mpmath.pi)"
job "π, base 3, 10^7" "digits pi --base 3 --count 10000000" "$(gp_base Pi 3 10000000)" "$(mp_base mpmath.pi 3 10000000)"
job "π, base 7, 10^7" "digits pi --base 7 --count 10000000" "$(gp_base Pi 7 10000000)" "$(mp_base mpmath.pi 7 10000000)"
job "e, base 10, 10^7" "digits e --count 10000000" "default(realprecision, 10000010); s = Str(exp(1));" "import mpmath; mpmath.mp.dps = 10000010; s = str(mpmath.e)"
job "√2, base 10, 10^7" "digits sqrt2 --count 10000000" "default(realprecision, 10000010); s = Str(sqrt(2));" "import mpmath; mpmath.mp.dps = 10000010; s = str(mpmath.sqrt(2))"
job "Stoneham α_{2,3}, base 6, 10^6" "digits stoneham:2,3 --base 6 --count 1000000" - \
  "import gmpy2
N = 1000000; one = gmpy2.mpz(6)**N; x = gmpy2.mpz(0); k = 1
while 3**k <= 3*N:
    x += one // (gmpy2.mpz(3)**k << (3**k)); k += 1
s = x.digits(6)"
job "rebase 10^7 decimals of π → base 3" "rebase --from 10 --to 3 $out/pi7.txt" - \
  "import gmpy2; s = open('$out/pi7.txt').read().strip(); t = gmpy2.mpz(s, 10).digits(3)"
if [ "${BIG:-0}" = 1 ]; then
  job "rebase 10^8 decimals of π → base 3" "rebase --from 10 --to 3 $out/pi8.txt" - \
    "import gmpy2; s = open('$out/pi8.txt').read().strip(); t = gmpy2.mpz(s, 10).digits(3)"
fi
