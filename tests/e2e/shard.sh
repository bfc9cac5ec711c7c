#!/bin/sh
# shard.sh - screen --shard K/N and merge: the merged run is the single run.
# For several catalog sets (the demo, families with boundaries and yield
# studies with invalid units, families that cannot be read, input errors and
# a duplicate id that falls in another shard than its first use, a catalog
# cut by a YAML error, a CSV catalog, 3000 generated plants merged with a
# spilled run) and N = 1, 2, 3, 4 and 7 (more shards than some catalogs have
# entries): the merge's listing, every report file and the exit code equal
# the single run's, byte for byte once the command line each quotes is
# replaced. Then the refusals: a shard missing or given twice, a catalog
# changed between shards, other options, another split, a file that is not
# a partial or is cut short, and --shard usage errors.
# Usage: shard.sh PLANTSIEVE SRCDIR
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
export SOURCE_DATE_EPOCH=1764892800

# Every report file and the listing with the command line replaced by CMD
# (it ends at a quote, '<' or '`' or the line's end).
normal() { sed 's/plantsieve \(screen\|merge\) [^"<`]*/CMD/g' "$1"; }

same_files() { # same_files NAME DIR_A DIR_B
    (cd "$2" && find . -type f | sort) >"$tmp/list.a"
    (cd "$3" && find . -type f | sort) >"$tmp/list.b"
    if ! cmp -s "$tmp/list.a" "$tmp/list.b" || [ ! -s "$tmp/list.a" ]; then
        fail=$((fail + 1)); echo "FAIL: $1: other files"; diff "$tmp/list.a" "$tmp/list.b" | head -5; return
    fi
    while read -r f; do
        normal "$2/$f" >"$tmp/n.a"
        normal "$3/$f" >"$tmp/n.b"
        if cmp -s "$tmp/n.a" "$tmp/n.b"; then pass=$((pass + 1)); else
            fail=$((fail + 1)); echo "FAIL: $1: $f differs from the single run"; diff "$tmp/n.a" "$tmp/n.b" | head -8
        fi
    done <"$tmp/list.a"
}

# compare_split NAME N "SCREEN OPTIONS" "MERGE OPTIONS" CATALOG...: run in $tmp/w (catalogs copied there)
compare_split() {
    name=$1 n=$2 sopt=$3 mopt=$4
    shift 4
    rm -rf "$tmp/w/single" "$tmp/w/parts" "$tmp/w/out"
    # both runs write into out/ (the listing names it): the single run's is then moved aside
    (cd "$tmp/w" && "$ps" screen --quiet -o out $sopt "$@" >single.out 2>single.err)
    want=$?
    mv "$tmp/w/out" "$tmp/w/single" 
    k=1
    while [ "$k" -le "$n" ]; do
        (cd "$tmp/w" && "$ps" screen --quiet --shard "$k/$n" -o parts $sopt "$@" >"shard$k.out" 2>"shard$k.err")
        check "$name: shard $k of $n written" 0 $?
        k=$((k + 1))
    done
    # the partials in reverse order: the merge orders them itself
    (cd "$tmp/w" && "$ps" merge -o out $mopt $(ls parts/*.partial | sort -r) >merged.out 2>merged.err)
    check "$name, $n shards: merge exit code as the single run's" "$want" $?
    normal "$tmp/w/single.out" >"$tmp/o.a"
    normal "$tmp/w/merged.out" >"$tmp/o.b"
    if cmp -s "$tmp/o.a" "$tmp/o.b"; then pass=$((pass + 1)); else
        fail=$((fail + 1)); echo "FAIL: $name, $n shards: the listing differs"; diff "$tmp/o.a" "$tmp/o.b" | head -8
    fi
    same_files "$name, $n shards" "$tmp/w/single" "$tmp/w/out"
}

mkdir -p "$tmp/w"
cp "$src/catalogs/demo-variants.yaml" "$src/tests/data/e2e/families.yaml" "$src/tests/data/e2e/bad-families.yaml" \
    "$src/tests/data/e2e/claims.yaml" "$src/tests/data/csv/three_forms.csv" "$tmp/w/"
# input errors, and a duplicate id whose first use is two entries earlier (another shard for N > 2)
cat >"$tmp/w/errors.yaml" <<'EOF'
defaults:
  rolloff_start: 60
plants:
  - id: twin
    poles: [2, -30]
    gain: 40
  - id: other
    poles: [-1, -20]
    gain: 5
  - id: twin
    poles: [1, -30]
    gain: 40
  - id: no-model
    gain: 3
  - id: fine
    poles: [-2, -9]
    gain: 1
EOF
# a catalog whose YAML breaks after two entries
printf 'plants:\n  - id: cut-a\n    poles: [-1, -2]\n    gain: 1\n  - id: cut-b\n    poles: [0.5, -20]\n    gain: 30\n    rolloff_start: 60\n  - id: [unclosed\n' >"$tmp/w/cut.yaml"

for n in 1 2 3 4 7; do
    compare_split "demo" "$n" "" "" demo-variants.yaml
done
for n in 2 3 7; do
    compare_split "families and claims" "$n" "" "" families.yaml claims.yaml
    compare_split "unreadable families, input errors, a cut catalog, CSV" "$n" "--gate marginal" "--gate marginal" \
        bad-families.yaml errors.yaml cut.yaml three_forms.csv
done
compare_split "--detail flagged --marginal-at 0.5" 3 "--detail flagged --marginal-at 0.5" "" demo-variants.yaml families.yaml

# 3000 generated plants, the merge spilling to its temporary file, the reports written on 1 thread
if "$py" "$src/tests/bench/gen_catalog.py" 3000 "$tmp/w/gen.yaml" --seed 5 >/dev/null 2>&1; then
    compare_split "3000 generated plants, merge --memory-rows 100" 4 "" "--memory-rows 100 --threads 1" gen.yaml
else
    echo "note: gen_catalog.py needs Debian's python3 with numpy and scipy: the generated case is left out"
fi

# ---- the refusals ----------------------------------------------------------
cd "$tmp/w" || exit 1
rm -rf p4 p2 && for k in 1 2 3 4; do "$ps" screen --quiet --shard "$k/4" -o p4 demo-variants.yaml >/dev/null; done
contains "a shard says what it wrote" shard1.out "partial result in parts/"
"$ps" merge --no-files p4/demo-variants.shard-1-of-4.partial p4/demo-variants.shard-2-of-4.partial \
    p4/demo-variants.shard-4-of-4.partial >/dev/null 2>err.txt
check "a shard missing" 4 $?
contains "a shard missing: named" err.txt "shard 3 of 4 is missing"
cp p4/demo-variants.shard-2-of-4.partial again.partial
"$ps" merge --no-files p4/*.partial again.partial >/dev/null 2>err.txt
check "a shard given twice" 4 $?
contains "a shard given twice: named" err.txt "shard 2 of 4 is given twice"
"$ps" screen --quiet --shard 1/2 -o p2 demo-variants.yaml >/dev/null
cp demo-variants.yaml changed.yaml.keep && echo "# a comment added between the shards" >>demo-variants.yaml
"$ps" screen --quiet --shard 2/2 -o p2 demo-variants.yaml >/dev/null
mv changed.yaml.keep demo-variants.yaml
"$ps" merge --no-files p2/*.partial >/dev/null 2>err.txt
check "a catalog changed between the shards" 4 $?
contains "a catalog changed: said with its digest" err.txt "catalog 'demo-variants.yaml' differs from the one"
"$ps" screen --quiet --shard 2/2 --marginal-at 0.7 -o p2 demo-variants.yaml >/dev/null
"$ps" merge --no-files p2/*.partial >/dev/null 2>err.txt
check "other options" 4 $?
contains "other options: named" err.txt "with other options than"
"$ps" screen --quiet --shard 2/3 -o p3 demo-variants.yaml >/dev/null
"$ps" merge --no-files p4/demo-variants.shard-1-of-4.partial p3/demo-variants.shard-2-of-3.partial >/dev/null 2>err.txt
check "another split" 4 $?
contains "another split: named" err.txt "partials of one split are merged together"
"$ps" merge --no-files demo-variants.yaml >/dev/null 2>err.txt
check "not a partial" 4 $?
contains "not a partial: said" err.txt "demo-variants.yaml: not a partial result of plantsieve"
size=$(wc -c <p4/demo-variants.shard-3-of-4.partial)
head -c $((size / 2)) p4/demo-variants.shard-3-of-4.partial >cut.partial
"$ps" merge --no-files p4/demo-variants.shard-1-of-4.partial p4/demo-variants.shard-2-of-4.partial cut.partial \
    p4/demo-variants.shard-4-of-4.partial >/dev/null 2>err.txt
check "a partial cut short" 4 $?
contains "a partial cut short: said" err.txt "cut.partial: "
# one byte changed in the middle (a plant's text, a number): the closing SHA-256 no longer matches
cp p4/demo-variants.shard-3-of-4.partial flipped.partial
printf 'Z' | dd of=flipped.partial bs=1 seek=$((size / 2)) conv=notrunc 2>/dev/null
cmp -s flipped.partial p4/demo-variants.shard-3-of-4.partial
check "the copy has one byte changed" 1 $?
"$ps" merge --no-files p4/demo-variants.shard-1-of-4.partial p4/demo-variants.shard-2-of-4.partial flipped.partial \
    p4/demo-variants.shard-4-of-4.partial >/dev/null 2>err.txt
check "a damaged partial" 4 $?
contains "a damaged partial: said" err.txt "flipped.partial: damaged: the SHA-256 of its content is"
for bad in 0/3 4/3 3 a/b 1/0 1/100001; do
    "$ps" screen --shard "$bad" demo-variants.yaml >/dev/null 2>err.txt
    check "--shard $bad refused" 2 $?
done
contains "--shard usage: said" err.txt "--shard takes K/N"

echo "shard.sh: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
