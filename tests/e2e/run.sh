#!/bin/sh
# run.sh - end-to-end checks of the plantsieve command line on real catalog
# files: exit codes, stdout, stderr diagnostics, and the JSON document parsed
# back by Debian's python3. Usage: run.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$1
src=$2
py=$(command -p -v python3)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
pass=0
fail=0

check() { # check NAME EXPECTED_RC ACTUAL_RC
    if [ "$2" = "$3" ]; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: $1 (exit $3, expected $2)"; fi
}
contains() { # contains NAME FILE TEXT
    if grep -qF -- "$3" "$2"; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: $1: '$3' not in $2:"; sed 's/^/    /' "$2"; fi
}

"$ps" --help >"$tmp/out" 2>"$tmp/err"; check "--help exits 0" 0 $?
contains "--help names survey" "$tmp/out" "survey CATALOG"
"$ps" --version >"$tmp/out" 2>&1; check "--version exits 0" 0 $?
contains "--version prints version" "$tmp/out" "plantsieve "
"$ps" >"$tmp/out" 2>"$tmp/err"; check "no command is a usage error" 2 $?
contains "usage error points to --help" "$tmp/err" "--help"
"$ps" frobnicate >"$tmp/out" 2>"$tmp/err"; check "unknown command" 2 $?
"$ps" survey --bogus x.yaml >"$tmp/out" 2>"$tmp/err"; check "unknown option" 2 $?
"$ps" survey >"$tmp/out" 2>"$tmp/err"; check "survey without files" 2 $?
"$ps" survey "$tmp/missing.yaml" >"$tmp/out" 2>"$tmp/err"; check "missing catalog is an I/O error" 4 $?
contains "missing catalog named" "$tmp/err" "plantsieve: $tmp/missing.yaml"

for cat in "$src/catalogs/demo-variants.yaml" "$src/catalogs/demo-variants.csv"; do
    "$ps" survey "$cat" >"$tmp/out" 2>"$tmp/err"; check "survey $cat" 0 $?
    "$ps" survey --json "$cat" >"$tmp/$(basename "$cat").json" 2>"$tmp/err"; check "survey --json $cat" 0 $?
done

# The same plants in YAML and CSV give identical models (source lines aside).
"$py" - "$tmp/demo-variants.yaml.json" "$tmp/demo-variants.csv.json" >"$tmp/cmp" 2>&1 <<'PY'
import json, sys
a, b = (json.load(open(f)) for f in sys.argv[1:3])
for doc in (a, b):
    assert doc["schema_version"] == 1
    c = doc["counts"]
    assert c["entries"] == c["models"] + c["errors"], c
    assert c["errors"] == 0, c
def strip(p):
    p = dict(p); p.pop("source"); return p
pa = [strip(p) for p in a["plants"]]
pb = [strip(p) for p in b["plants"]]
assert len(pa) == len(pb) and len(pa) >= 15, (len(pa), len(pb))
for x, y in zip(pa, pb):
    assert x == y, (x["id"], y["id"])
for p in a["plants"]:
    for k in ("id", "source", "form", "poles", "zeros", "gain", "delay", "relative_degree",
              "classification", "warnings", "error"):
        assert k in p, (p["id"], k)
print("yaml == csv:", len(pa), "plants")
PY
check "YAML and CSV demo catalogs agree" 0 $?
[ "$fail" -eq 0 ] || cat "$tmp/cmp"

# Every JSON document validates against the shipped schema (python3-jsonschema).
for doc in "$tmp/demo-variants.yaml.json" "$tmp/demo-variants.csv.json"; do
    "$py" -c '
import json, sys, jsonschema
schema = json.load(open(sys.argv[1]))
jsonschema.validate(json.load(open(sys.argv[2])), schema)
' "$src/reports/schema/plantsieve-survey.schema.json" "$doc"; check "JSON validates against the schema: $doc" 0 $?
done

# The demo report committed in reports/ is what the program writes now.
(cd "$src" && "$ps" survey --json catalogs/demo-variants.yaml) >"$tmp/now.json" 2>/dev/null
cmp -s "$tmp/now.json" "$src/reports/demo-survey.json"; check "reports/demo-survey.json is up to date" 0 $?

# Broken catalogs: every entry ends as a model or an error, diagnostics name file:line.
for cat in "$src/catalogs/broken/broken-entries.yaml" "$src/catalogs/broken/broken-rows.csv"; do
    "$ps" survey --json "$cat" >"$tmp/broken.json" 2>"$tmp/err"
    rc=$?
    [ "$rc" = 3 ] || [ "$rc" = 4 ]; check "broken catalog $cat exits 3 or 4" 0 $?
    contains "diagnostic names the file" "$tmp/err" "plantsieve: $cat:"
    case "$cat" in *.yaml) contains "duplicate id reported" "$tmp/err" "duplicate id 'ml-ok'" ;; esac
    "$py" -c '
import json, sys, jsonschema
d = json.load(open(sys.argv[1]))
jsonschema.validate(d, json.load(open(sys.argv[2])))
c = d["counts"]
assert c["entries"] == c["models"] + c["errors"] == len(d["plants"]), c
assert c["errors"] >= 2 and c["models"] >= 2, c
for p in d["plants"]:
    if p["error"]:
        assert p["error"]["line"] > 0 and p["error"]["message"], p
' "$tmp/broken.json" "$src/reports/schema/plantsieve-survey.schema.json"; check "broken catalog counts $cat" 0 $?
done

# Screening: closed-form answers, gates, reports parsed back, determinism.
cf="$src/tests/data/e2e/closed-form.yaml"
"$ps" screen -o "$tmp/scr" "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: default gate trips on redesign" 1 $?
"$ps" screen -o "$tmp/scr" --gate never "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: gate never" 0 $?
"$ps" screen -o "$tmp/scr" --gate marginal "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: gate marginal" 1 $?
"$ps" screen -o "$tmp/scr" --gate sometimes "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: bad gate is a usage error" 2 $?
"$ps" screen -o "$tmp/scr" --gate never "$src/catalogs/broken/broken-entries.yaml" >"$tmp/out" 2>"$tmp/err"; check "screen: unreadable entries" 3 $?
"$ps" explain pole-zero "$cf" >"$tmp/out" 2>"$tmp/err"; check "explain exits 0" 0 $?
contains "explain shows the floor formula" "$tmp/out" "|z + conj p| / |z - p|"
"$ps" explain nosuch "$cf" >"$tmp/out" 2>"$tmp/err"; check "explain: unknown id" 2 $?
"$ps" screen -o "$tmp/scr2" --gate never "$cf" >/dev/null 2>&1
for ext in txt csv json md html; do
    cmp -s "$tmp/scr/closed-form.screen.$ext" "$tmp/scr2/closed-form.screen.$ext"; check "screen: $ext deterministic" 0 $?
done
ls -A "$tmp/scr" | grep -q '^\.' ; check "screen: no temporary file left" 1 $?
"$py" -c '
import csv, json, math, sys
d = json.load(open(sys.argv[1]))
P = {p["id"]: p for p in d["plants"]}
assert [p["id"] for p in d["plants"]] == ["one-pole-tight", "pole-zero", "one-pole-wide", "stable"], list(P)
assert P["one-pole-tight"]["verdict"] == "redesign" and P["pole-zero"]["verdict"] == "redesign"
assert P["one-pole-wide"]["verdict"] == "clear" and P["stable"]["verdict"] == "clear"
# exp(pi p / W_a) = Ms_allowed (Stein 2003): p* = W_a ln 2 / pi
pstar = 40 * math.log(2) / math.pi
for i in ("one-pole-tight", "one-pole-wide"):
    lim = P[i]["targets"]["unstable_pole"]["limit"]
    assert abs(lim - pstar) <= 1e-6 * pstar, (i, lim, pstar)
# (z + p)/(z - p) = Ms_allowed = 2 with p = 2: z* = 6 (S&P 2nd ed. ch. 5)
lim = P["pole-zero"]["targets"]["rhp_zero"]["limit"]
assert abs(lim - 6) <= 1e-6 * 6, lim
# w_h with exp(pi 12 / w_h) = 2
wh = P["one-pole-tight"]["targets"]["rolloff_start"]["limit"]
assert abs(wh - math.pi * 12 / math.log(2)) <= 1e-6 * wh, wh
assert "caution" in d and "necessary" in d["caution"]
rows = list(csv.DictReader(open(sys.argv[2], newline="")))
assert [r["id"] for r in rows] == [p["id"] for p in d["plants"]], rows
assert rows[1]["verdict"] == "redesign"
' "$tmp/scr/closed-form.screen.json" "$tmp/scr/closed-form.screen.csv"; check "screen: closed-form verdicts, ranking and targets" 0 $?
(cd "$src" && "$ps" screen -o "$tmp/demo" --gate never catalogs/demo-variants.yaml >/dev/null 2>&1)
for ext in txt csv json md html; do
    cmp -s "$tmp/demo/demo-variants.screen.$ext" "$src/reports/demo-variants.screen.$ext"; check "committed demo report $ext is current" 0 $?
done

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
