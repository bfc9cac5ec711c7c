#!/bin/sh
# floors_bench_counts.sh - floors_bench (the benchmark's timed floors, see
# floors_bench.c) judges a generated catalog as `plantsieve screen` does:
# same verdict counts, no plant left out. Not a timing test.
# Usage: floors_bench_counts.sh FLOORS_BENCH PLANTSIEVE SRCDIR PYTHON
fb=$1
ps=$2
src=$3
py=$4
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
if ! "$py" "$src/tests/bench/gen_catalog.py" 3000 "$tmp/gen.yaml" --seed 5 >/dev/null 2>&1; then
    echo "FAIL: gen_catalog.py did not run (Debian's python3 with numpy and scipy is needed)"
    exit 1
fi
fails=0
line=$("$fb" "$tmp/gen.yaml") || { echo "FAIL: floors_bench exit $?"; exit 1; }
echo "$line"
# "Counts: ○ clear 24, ◐ marginal 1, ..." -> "clear 24 marginal 1 ..."
want=$("$ps" screen --no-files --gate never --detail none --quiet --show 1 "$tmp/gen.yaml" |
    sed -n 's/^Counts: //p' | sed 's/[^a-z0-9 -]//g; s/input-error [0-9]*//; s/  */ /g; s/^ //; s/ $//')
got=$(echo "$line" | sed 's/.*verdicts //; s/,//g; s/ errors [0-9]*//')
echo "screen:       $want"
echo "floors_bench: $got"
if [ -z "$want" ] || [ "$want" != "$got" ]; then
    echo "FAIL: the verdict counts differ"
    fails=$((fails + 1))
fi
case $line in
*" 3000 plants,"*) ;;
*) echo "FAIL: not 3000 plants"; fails=$((fails + 1)) ;;
esac
case $line in
*"errors 0") ;;
*) echo "FAIL: errors"; fails=$((fails + 1)) ;;
esac
[ $fails -eq 0 ] && echo "floors_bench_counts: pass" && exit 0
exit 1
