#!/bin/sh
# shard_parallel.sh - shard-and-merge run by GNU parallel (Debian package
# `parallel`), as a user spreads shards over cores or, with --sshlogin, over
# hosts: a catalog set screened 4 ways by 4 concurrent jobs, then merged;
# the merged listing, every report and the exit code equal the single run's
# (byte for byte once the command line they quote is replaced). Skipped (77)
# where parallel is not installed, except under CI=true, where it must be.
# Usage: shard_parallel.sh PLANTSIEVE SRCDIR
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
export SOURCE_DATE_EPOCH=1764892800
if ! command -v parallel >/dev/null 2>&1; then
    if [ "${CI:-}" = true ]; then echo "FAIL: GNU parallel is not installed (apt-get install parallel)"; exit 1; fi
    echo "skipped: GNU parallel is not installed (apt-get install parallel)"
    exit 77
fi
normal() { sed 's/plantsieve \(screen\|merge\) [^"<`]*/CMD/g' "$1"; }

cd "$tmp" || exit 1
cp "$src/catalogs/demo-variants.yaml" "$src/tests/data/e2e/families.yaml" .
set -- demo-variants.yaml families.yaml
if "$py" "$src/tests/bench/gen_catalog.py" 2000 gen.yaml --seed 9 >/dev/null 2>&1; then
    set -- "$@" gen.yaml
else
    echo "note: gen_catalog.py needs Debian's python3 with numpy and scipy: the 2000 generated plants are left out"
fi
"$ps" screen --quiet -o out "$@" >single.out 2>single.err
want=$?
mv out single
# --halt now,fail=1: a shard that fails stops the others; the merge would refuse the set anyway
parallel --will-cite --halt now,fail=1 -j 4 "$ps" screen --quiet --threads 1 --shard {}/4 -o parts "$@" ::: 1 2 3 4 \
    >parallel.out 2>parallel.err
check "parallel ran the 4 shards" 0 $?
n_parts=$(ls parts/*.partial 2>/dev/null | wc -l)
check "4 partial results" 4 "$n_parts"
"$ps" merge -o out parts/*.partial >merged.out 2>merged.err
check "merge exit code as the single run's" "$want" $?
normal single.out >o.a
normal merged.out >o.b
if cmp -s o.a o.b; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: the listing differs"; diff o.a o.b | head; fi
(cd single && find . -type f | sort) >l.a
(cd out && find . -type f | sort) >l.b
check "the same report files" 0 "$(cmp -s l.a l.b && [ -s l.a ] && echo 0 || echo 1)"
while read -r f; do
    normal "single/$f" >n.a
    normal "out/$f" >n.b
    if cmp -s n.a n.b; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: $f differs"; diff n.a n.b | head -5; fi
done <l.a
echo "shard_parallel.sh: $pass passed, $fail failed ($(wc -l <l.a) report files compared)"
[ "$fail" -eq 0 ]
