#!/bin/sh
# certify_scipy.sh - every controller that `plantsieve certify --json` reports,
# verified again outside the tool by tests/oracle/certify_check.py (Debian's
# numpy/scipy/PyYAML): closed-loop stability (roots without delay, a Nyquist
# count with delay), the peaks of |S|, |T|, |C S| on a dense grid, every
# requirement of a "demonstrated" plant, the floors law. Two runs: the demo
# catalog at the default budget, and 200 generated plants (seed 11) at
# --budget 400. The minimum counts keep the test from passing by checking
# nothing (a run that reports fewer controllers fails). Then the interpolation construction
# ("attained") on tests/data/oracle/attain.yaml, by tests/oracle/attain_check.py.
# Skipped (77) where numpy, scipy or PyYAML is missing, except under CI=true.
# Usage: certify_scipy.sh PLANTSIEVE SRCDIR
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
if [ -z "$py" ] || ! "$py" -c 'import numpy, scipy.optimize, yaml' >/dev/null 2>&1; then
    if [ "${CI:-}" = true ]; then echo "FAIL: Debian's python3 lacks numpy, scipy or PyYAML"; exit 1; fi
    echo "skipped: Debian's python3 (command -p python3) lacks numpy, scipy or PyYAML"
    exit 77
fi
cd "$tmp" || exit 1

# certify_run NAME MIN_CONTROLLERS MIN_DEMONSTRATED CATALOG [OPTIONS...]
certify_run() {
    name=$1 min_c=$2 min_d=$3 cat=$4
    shift 4
    "$ps" certify --json "$@" "$cat" >"$name.json" 2>"$name.err"
    rc=$?
    check "certify --json $* $name exits 0" 0 $rc
    if [ $rc -ne 0 ]; then sed 's/^/    /' "$name.err"; return; fi
    "$py" "$src/tests/oracle/certify_check.py" --min-controllers "$min_c" --min-demonstrated "$min_d" \
        "$name.json" "$cat" >"$name.check" 2>&1
    rc=$?
    check "certify_check.py on $name" 0 $rc
    # every disagreement, and the summary, in the ctest log
    grep -v '^ok ' "$name.check"
}

certify_run demo 15 1 "$src/catalogs/demo-variants.yaml"

# The interpolation construction where no roll-off is required (certify's "attained"):
# stability by closed-loop roots, the peaks of |S| and |T| on a dense grid, each within 1 %
# of the floor recomputed from the plant's RHP pole and zero, never below it.
"$ps" certify --json "$src/tests/data/oracle/attain.yaml" >attain.json 2>attain.err
check "certify --json on the construction's plants exits 0" 0 $?
"$py" "$src/tests/oracle/attain_check.py" attain.json 7 >attain.check 2>&1
check "attain_check.py: the floors reached, checked with scipy" 0 $?
grep -v '^ok ' attain.check
if "$py" "$src/tests/bench/gen_catalog.py" 200 gen.yaml --seed 11 >/dev/null 2>gen.err; then
    certify_run gen 100 60 gen.yaml --budget 400 --threads 2
    # the searches are seeded from the plant ids: one thread gives the same document
    "$ps" certify --json --budget 400 --threads 1 gen.yaml >gen1.json 2>/dev/null
    cmp -s gen.json gen1.json; check "certify --threads 1 and --threads 2 give the same JSON" 0 $?
else
    fail=$((fail + 1))
    echo "FAIL: gen_catalog.py 200 gen.yaml --seed 11:"
    sed 's/^/    /' gen.err
fi
# The check must be able to fail: copies of the generated run's JSON, each with one
# demonstrated plant that passed above altered, must fail naming that plant. pick KIND
# prints the first such plant (KIND nodelay / delay), mutate.py ID WHAT writes the copy.
cat >mutate.py <<'PYEOF'
import json, sys
src, dst, pid, what = sys.argv[1:5]
d = json.load(open(src))
for p in d["plants"]:
    if p["id"] == pid:
        c = p["controller"]
        if what == "num3":      # a controller three times as strong as the one certified
            c["num"] = [3 * x for x in c["num"]]
        elif what == "negate":  # the sign of the controller flipped
            c["num"] = [-x for x in c["num"]]
        elif what == "gain1000":  # far too much gain on a loop with delay: unstable
            c["num"] = [1000 * x for x in c["num"]]
        elif what == "ms":      # a peak |S| understated by 1 %
            p["found"]["ms"] *= 0.99
d["plants"] = [p for p in d["plants"] if p["id"] == pid]  # that plant alone: the check is quick
json.dump(d, open(dst, "w"))
PYEOF
pick() { # pick nodelay|delay: of the demonstrated plants with(out) delay that passed the check,
    # the one with the largest peak |T| (the loop that does the most; a loop of tiny gain would
    # shrug off a changed gain)
    "$py" - gen.json gen.check "$1" <<'PYEOF'
import json, sys
ok = {l.split()[1] for l in open(sys.argv[2]) if l.startswith("ok ") and " demonstrated " in l}
c = [p for p in json.load(open(sys.argv[1]))["plants"]
     if p["id"] in ok and (p["plant"]["delay"] > 0) == (sys.argv[3] == "delay")]
if c:
    print(max(c, key=lambda p: p["found"]["mt"])["id"])
PYEOF
}
mutant() { # mutant ID WHAT [TEXT]: the check fails, naming ID (and saying TEXT)
    "$py" mutate.py gen.json "mut-$2.json" "$1" "$2"
    "$py" "$src/tests/oracle/certify_check.py" "mut-$2.json" gen.yaml >"mut-$2.out" 2>&1
    check "mutant $2 of $1 fails" 1 $?
    if grep -qF "FAIL $1 " "mut-$2.out" && { [ -z "${3:-}" ] || grep -F "     $1: " "mut-$2.out" | grep -qF "$3"; }; then
        pass=$((pass + 1))
        echo "mutant $2 of $1 caught: $(grep -F "     $1: " "mut-$2.out" | head -1 | sed 's/^ *//')"
    else
        fail=$((fail + 1))
        echo "FAIL: mutant $2 of $1: the check does not name it${3:+ with '$3'}"
        grep -F "$1" "mut-$2.out" | sed 's/^/    /'
    fi
}
if [ -s gen.check ]; then
    id=$(pick nodelay)
    idd=$(pick delay)
    if [ -n "$id" ] && [ -n "$idd" ]; then
        mutant "$id" num3
        mutant "$id" negate
        mutant "$id" ms "ms "
        mutant "$idd" gain1000 "unstable by the Nyquist count"
    else
        fail=$((fail + 1))
        echo "FAIL: no demonstrated plant with and without delay passed the check, none to alter"
    fi
fi
echo "certify_scipy.sh: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
