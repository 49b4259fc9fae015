# Timing helpers shared by the bench scripts (sourced; RUNS must be set).
# Single runs on a shared machine vary by up to a factor of two, so every
# figure is the best of RUNS runs.

# once CMD...: run CMD once, print its wall-clock seconds.
once() { local t0 t1; t0=$(date +%s.%N); "$@" > /dev/null; t1=$(date +%s.%N); echo "$t1 - $t0" | bc -l; }
# best T...: the smallest of the given times.
best() { printf '%s\n' "$@" | sort -g | head -1; }
# secs CMD...: the best of RUNS runs of CMD.
secs() { local ts=(); for _ in $(seq "$RUNS"); do ts+=("$(once "$@")"); done; best "${ts[@]}"; }
# ratio A B: A/B to two decimals.
ratio() { printf '%.2f' "$(echo "$1 / $2" | bc -l)"; }
