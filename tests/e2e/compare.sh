#!/bin/sh
# compare.sh - end-to-end checks of `plantsieve compare`: two catalogs that
# differ in known ways (tests/data/compare/old.yaml, new.yaml) screened into
# two report sets, the changes listed exactly, the exit code of each gate, the
# JSON document against its schema (python3-jsonschema), the handwritten
# schema_version 3 and 4 fixtures, and broken reports (exit 4, file:line).
# Usage: compare.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
data=$src/tests/data/compare
schema=$src/reports/schema/plantsieve-comparison.schema.json

# ---- the command line ----
"$ps" compare --help >"$tmp/out" 2>"$tmp/err"; check "compare --help exits 0" 0 $?
contains "compare --help on stdout" "$tmp/out" "usage: plantsieve compare"
"$ps" compare >"$tmp/out" 2>"$tmp/err"; check "compare without reports" 2 $?
contains "usage error points to --help" "$tmp/err" "plantsieve compare --help"
"$ps" compare "$data/hand-old.screen.json" >"$tmp/out" 2>"$tmp/err"; check "compare with one report" 2 $?
"$ps" compare a b c >"$tmp/out" 2>"$tmp/err"; check "compare with three reports" 2 $?
"$ps" compare --gate sometimes a b >"$tmp/out" 2>"$tmp/err"; check "bad --gate" 2 $?
"$ps" compare --tolerance -0.5 a b >"$tmp/out" 2>"$tmp/err"; check "negative --tolerance" 2 $?
"$ps" compare --tolerance 1e999 a b >"$tmp/out" 2>"$tmp/err"; check "infinite --tolerance" 2 $?
"$ps" compare --bogus a b >"$tmp/out" 2>"$tmp/err"; check "unknown option" 2 $?
contains "unknown option named" "$tmp/err" "--bogus"
"$ps" compare a b --json >"$tmp/out" 2>"$tmp/err"; check "--json without a value" 2 $?

# ---- two real runs ----
"$ps" screen --gate never --quiet -o "$tmp/old" "$data/old.yaml" >/dev/null 2>"$tmp/err"; check "screen old.yaml" 0 $?
"$ps" screen --gate never --quiet -o "$tmp/new" "$data/new.yaml" >/dev/null 2>"$tmp/err"
check "screen new.yaml (one input error)" 3 $?
old=$tmp/old/old.screen
new=$tmp/new/new.screen

"$ps" compare --json "$tmp/c.json" --markdown "$tmp/c.md" "$old" "$new" >"$tmp/c.txt" 2>"$tmp/err"
check "compare: some plant worse, default gate trips" 1 $?
"$ps" compare --gate worse "$old" "$new" >/dev/null 2>&1; check "gate worse trips" 1 $?
"$ps" compare --gate changed "$old" "$new" >/dev/null 2>&1; check "gate changed trips" 1 $?
"$ps" compare --gate never "$old" "$new" >/dev/null 2>&1; check "gate never" 0 $?
"$ps" compare --gate changed "$old" "$old" >"$tmp/same.txt" 2>&1; check "a run against itself: gate changed" 0 $?
contains "a run against itself is unchanged" "$tmp/same.txt" \
    "summary: 0 worse, 0 better; 0 verdict changed, 0 severity changed, 0 added, 0 removed, 6 unchanged"
# The directory given to screen -o, the summary file and the set directory are the same run.
"$ps" compare --gate changed "$tmp/old" "$old/old.screen.json" >/dev/null 2>&1; check "screen -o DIR as a report" 0 $?

contains "verdict worse" "$tmp/c.txt" "  cmp-lag: clear -> redesign (severity "
contains "verdict better" "$tmp/c.txt" "  cmp-faster: redesign -> clear (severity "
contains "no longer judged" "$tmp/c.txt" "  cmp-typo: clear -> input-error (severity "
contains "severity worse" "$tmp/c.txt" "  cmp-slower: redesign, severity "
contains "added" "$tmp/c.txt" "  cmp-fresh: clear, severity "
contains "removed" "$tmp/c.txt" "  cmp-retired: clear, severity "
contains "summary line" "$tmp/c.txt" \
    "summary: 3 worse, 1 better; 3 verdict changed, 1 severity changed, 1 added, 1 removed, 1 unchanged"
contains "gate line" "$tmp/c.txt" "gate worse: tripped"
contains "caution in the text" "$tmp/c.txt" "Caution: these floors are necessary conditions only."

# Exactly the known changes, each with its direction, checked on the JSON
# (against the schema) and against the two screens' own JSON reports.
PS_E2E_DIR="$src/tests/e2e" "$py" - "$schema" "$tmp/c.json" "$old/old.screen.json" "$new/new.screen.json" "$tmp/c.md" "$tmp/c.txt" \
    >"$tmp/py.out" 2>&1 <<'PY'
import json, os, sys, jsonschema
sys.path.insert(0, os.environ["PS_E2E_DIR"])
import screen_doc  # the summary and its JSON Lines records
schema, doc = (json.load(open(f)) for f in sys.argv[1:3])
a, b = (screen_doc.load(f) for f in sys.argv[3:5])
md, txt = open(sys.argv[5]).read(), open(sys.argv[6]).read()
jsonschema.validate(doc, schema)
got = {(c["kind"], c["id"], c["direction"], c["words"]) for c in doc["changes"]}
want = {("verdict", "cmp-lag", "worse", "worse"),
        ("verdict", "cmp-faster", "better", "better"),
        ("verdict", "cmp-typo", "worse", "worse: no longer judged"),
        ("severity", "cmp-slower", "worse", "worse"),
        ("added", "cmp-fresh", "none", ""),
        ("removed", "cmp-retired", "none", "")}
assert got == want, sorted(got ^ want)
assert len(doc["changes"]) == 6
assert doc["counts"] == {"worse": 3, "better": 1, "verdict_changed": 3, "severity_changed": 1, "added": 1,
                         "removed": 1, "unchanged": 1, "without_id_old": 0, "without_id_new": 0}, doc["counts"]
assert doc["gate"] == "worse" and doc["gate_tripped"] is True
# Every old/new value is the screen's own, plant by plant.
pa = {p["id"]: p for p in a["plants"]}
pb = {p["id"]: p for p in b["plants"]}
for c in doc["changes"]:
    for side, ps in (("old", pa), ("new", pb)):
        if c[side] is None:
            assert c["id"] not in ps, (c["id"], side)
            continue
        p = ps[c["id"]]
        assert c[side]["verdict"] == p["verdict"], (c["id"], side)
        assert c[side]["severity"] == p["severity"], (c["id"], side)
        assert c[side]["rank"] == p["rank"] and c[side]["line"] == p["source"]["line"], (c["id"], side)
    if c["kind"] == "severity":
        o, n = c["old"]["severity"], c["new"]["severity"]
        assert abs(n - o) > doc["severity_tolerance"] and (n > o) == (c["direction"] == "worse")
# The unchanged plant really is (same verdict, severity within the tolerance).
assert pa["cmp-steady"]["verdict"] == pb["cmp-steady"]["verdict"]
assert abs(pa["cmp-steady"]["severity"] - pb["cmp-steady"]["severity"]) <= 0.01
# One Markdown table row per change, under its section.
for kind, title in (("verdict", "## Verdict changed (3)"), ("severity", "## Severity changed"),
                    ("added", "## Added"), ("removed", "## Removed")):
    assert title in md, title
rows = [l for l in md.splitlines() if l.startswith("| cmp-")]
assert len(rows) == 6, rows
assert "## Caution" in md
print("compare: the six known changes, directions and counts")
PY
check "compare lists exactly the known changes" 0 $?
[ "$fail" -eq 0 ] || cat "$tmp/py.out"

# ---- handwritten fixtures: schema_version 3 against a version 4 summary + JSON Lines ----
ho=$data/hand-old.screen.json
hn=$data/v4/hand-new.screen.json
"$ps" compare --gate worse "$ho" "$hn" >"$tmp/h.txt" 2>"$tmp/err"; check "v3 -> v4: only better: gate worse passes" 0 $?
"$ps" compare --gate changed "$ho" "$hn" >/dev/null 2>&1; check "v3 -> v4: gate changed trips" 1 $?
"$ps" compare --gate never "$ho" "$hn" >/dev/null 2>&1; check "v3 -> v4: gate never" 0 $?
"$ps" compare --gate changed "$hn" "$data/v4" >/dev/null 2>&1; check "summary and its directory are one run" 0 $?
"$ps" compare --gate changed "$hn" "$data/v4/hand-new.screen.plants.jsonl" >/dev/null 2>&1
check "summary and its plants file are one run" 0 $?
contains "v4 summary followed" "$tmp/h.txt" "hand-new.screen.plants.jsonl (8 plants, jsonl-v4-summary)"
contains "v3 read" "$tmp/h.txt" "hand-old.screen.json (7 plants, json-v3)"
contains "marginal -> clear" "$tmp/h.txt" "  h-mar: marginal -> clear (severity 0.853 -> 0.517): better"
contains "severity down within redesign" "$tmp/h.txt" "  h-red: redesign, severity 1.537 -> 1.1 (-0.437): better"
contains "needs-bandwidth added" "$tmp/h.txt" "  h-bw: needs-bandwidth, severity none (new rank 6, hand.yaml:80)"
contains "rows without id listed" "$tmp/h.txt" "  input-error, severity none (old rank 7, hand.yaml:70)"
contains "duplicate id stated" "$tmp/h.txt" "  h-dup: 2 times in the old run, 2 in the new"
contains "hand summary" "$tmp/h.txt" \
    "summary: 0 worse, 2 better; 1 verdict changed, 1 severity changed, 1 added, 0 removed, 4 unchanged, 2 without id (old 1, new 1)"
# A plant removed and nothing else: not worse, but a change.
"$py" -c '
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1]) if "h-bw" not in l]
for i, r in enumerate(rows):
    r["rank"] = i + 1
print("\n".join(json.dumps(r) for r in rows))
' "$data/v4/hand-new.screen.plants.jsonl" >"$tmp/less.plants.jsonl"
"$ps" compare --gate worse "$data/v4/hand-new.screen.plants.jsonl" "$tmp/less.plants.jsonl" >"$tmp/less.txt" 2>&1
check "only a plant removed: gate worse passes" 0 $?
contains "only removed" "$tmp/less.txt" "summary: 0 worse, 0 better; 0 verdict changed, 0 severity changed, 0 added, 1 removed, 6 unchanged"
"$ps" compare --gate changed "$data/v4/hand-new.screen.plants.jsonl" "$tmp/less.plants.jsonl" >/dev/null 2>&1
check "only a plant removed: gate changed trips" 1 $?
"$ps" compare --gate changed "$tmp/less.plants.jsonl" "$data/v4/hand-new.screen.plants.jsonl" >/dev/null 2>&1
check "only a plant added: gate changed trips" 1 $?
# The reverse direction: every change is worse (and the added plant removed).
"$ps" compare --json "$tmp/r.json" "$hn" "$ho" >"$tmp/r.txt" 2>&1; check "v4 -> v3: worse trips" 1 $?
contains "reverse summary" "$tmp/r.txt" "summary: 2 worse, 0 better; 1 verdict changed, 1 severity changed, 0 added, 1 removed"
# The tolerance: h-clr moved by 0.0045 (clear: listed, neither worse nor better); h-red by 0.437.
"$ps" compare --tolerance 0.001 "$ho" "$hn" >"$tmp/t.txt" 2>&1; check "small tolerance" 0 $?
contains "clear plant's severity listed, no direction" "$tmp/t.txt" \
    "  h-clr: clear, severity 0.312 -> 0.3165 (+0.0045): neither worse nor better for this verdict"
"$ps" compare --tolerance 0.5 "$ho" "$hn" >"$tmp/t.txt" 2>&1; check "large tolerance" 0 $?
contains "a change within the tolerance is unchanged" "$tmp/t.txt" "1 verdict changed, 0 severity changed"
"$py" -c '
import json, sys, jsonschema
d = json.load(open(sys.argv[2])); jsonschema.validate(d, json.load(open(sys.argv[1])))
assert d["duplicate_ids"] == [{"id": "h-dup", "old": 2, "new": 2}], d["duplicate_ids"]
k = sorted((c["kind"], c["id"] or "", c["direction"]) for c in d["changes"])
assert k == [("removed", "h-bw", "none"), ("severity", "h-red", "worse"), ("verdict", "h-mar", "worse"),
             ("without-id", "", "none"), ("without-id", "", "none")], k
' "$schema" "$tmp/r.json"; check "reverse JSON: schema, duplicates, changes" 0 $?

# ---- broken reports: exit 4, the file, the line and what was expected ----
jl=$data/v4/hand-new.screen.plants.jsonl
bad() { # bad NAME FILE TEXT...: compare FILE against the fixture; exit 4, each TEXT on stderr
    name=$1; file=$2; shift 2
    "$ps" compare "$ho" "$file" >"$tmp/out" 2>"$tmp/err"; check "$name: exit 4" 4 $?
    for t in "$@"; do contains "$name" "$tmp/err" "$t"; done
    [ ! -s "$tmp/out" ]; check "$name: nothing on stdout" 0 $?
}
head -c 300 "$jl" >"$tmp/cut.jsonl"
bad "truncated JSON Lines" "$tmp/cut.jsonl" "$tmp/cut.jsonl:3:" "expected one JSON object per line"
sed '3s/"verdict": "redesign", //' "$jl" >"$tmp/noverdict.jsonl"
bad "missing field" "$tmp/noverdict.jsonl" "$tmp/noverdict.jsonl:3: field 'verdict': missing"
sed '5s/"clear"/"fine"/' "$jl" >"$tmp/badverdict.jsonl"
bad "unknown verdict" "$tmp/badverdict.jsonl" "$tmp/badverdict.jsonl:5: field 'verdict': expected one of clear,"
sed '4d' "$jl" >"$tmp/gap.jsonl"
bad "a line missing in the middle" "$tmp/gap.jsonl" "$tmp/gap.jsonl:4: field 'rank': expected 4"
sed '2s/1.213/"high"/' "$jl" >"$tmp/sevtext.jsonl"
bad "severity as text" "$tmp/sevtext.jsonl" "field 'severity': expected a number or null"
printf '%s\n\n' "$(head -n 1 "$jl")" >"$tmp/blank.jsonl"
bad "empty line" "$tmp/blank.jsonl" "$tmp/blank.jsonl:2:" "empty line"
printf 'id,verdict\nx,clear\n' >"$tmp/table.json"
bad "not JSON" "$tmp/table.json" "$tmp/table.json:1:" "not JSON"
printf '[1, 2]\n' >"$tmp/array.json"
bad "JSON but not a screening report" "$tmp/array.json" "expected a screening report"
sed 's/"schema_version": 3/"schema_version": 9/' "$ho" >"$tmp/v9.json"
bad "unknown schema version" "$tmp/v9.json" "expected schema_version 1 to 6"
mkdir "$tmp/v4cut"
cp "$hn" "$tmp/v4cut/"
head -n 7 "$jl" >"$tmp/v4cut/hand-new.screen.plants.jsonl"
bad "plants file cut at a line end (summary counts disagree)" "$tmp/v4cut/hand-new.screen.json" \
    "$tmp/v4cut/hand-new.screen.json: counts.per_verdict.input-error is 2 but 1 plants with that verdict were read"
rm "$tmp/v4cut/hand-new.screen.plants.jsonl"
bad "summary without its plants file" "$tmp/v4cut/hand-new.screen.json" "hand-new.screen.plants.jsonl: cannot open"
sed 's|"plants_file": "|"plants_file": "../|' "$hn" >"$tmp/v4cut/escape.screen.json"
bad "plants_file outside the summary's directory" "$tmp/v4cut/escape.screen.json" \
    "expected the name of the plants file beside the summary"
mkdir "$tmp/empty"
bad "directory without a report" "$tmp/empty" "no *.screen.plants.jsonl or *.screen.json in this directory"
bad "missing file" "$tmp/nothing.screen.json" "$tmp/nothing.screen.json: cannot open"
"$ps" compare "$tmp/table.json" "$hn" >"$tmp/out" 2>"$tmp/err"; check "broken old report: exit 4" 4 $?
contains "which run" "$tmp/err" "the old run could not be read"

# ---- output failures ----
"$ps" compare --json "$tmp/no/such/dir/c.json" "$ho" "$hn" >/dev/null 2>"$tmp/err"; check "unwritable --json" 4 $?
contains "unwritable --json named" "$tmp/err" "$tmp/no/such/dir/c.json: cannot write"
if [ -w /dev/full ]; then
    "$ps" compare "$ho" "$hn" >/dev/full 2>"$tmp/err"; check "stdout on a full device" 4 $?
fi

echo "compare: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
