#!/bin/sh
# report_data.sh - the data formats of a report set (issue 16): bounded sizes on a generated
# catalog of N plants, the JSON summary and every JSON Lines record against their schemas,
# SOURCE_DATE_EPOCH honoured and two runs without it byte-identical, the caution once in the
# Markdown, notes and the structural flag in every format.
# Usage: report_data.sh PLANTSIEVE SOURCE_DIR N [WHY]  (WHY: printed when N is cut down)
set -u
ps=$1
case $ps in /*) ;; *) ps=$(pwd)/$ps ;; esac   # the checks run it from other directories
src=$2
n=$3
. "$src/tests/e2e/lib.sh"
export PYTHONPATH="$src/tests/e2e"
[ $# -ge 4 ] && echo "note: $4"

# Sizes on a generated catalog of N plants (tests/bench/gen_catalog.py). The bounds (bytes a
# plant, rows) are those stated in the README: JSON summary < 64 kB whatever N, JSON Lines
# <= 1750 bytes a plant (the target is about 1.5 kB; tests/bench/run.sh prints MET/MISS against
# it), Markdown < 1 MB whatever N (caps: 200 table rows, 200 plants in detail), CSV and JSON
# Lines one row/line per plant. The HTML is not bounded yet: only its size is printed.
# Not a timing test.
mkdir -p "$tmp/big"
"$py" "$src/tests/bench/gen_catalog.py" "$n" "$tmp/big/gen.yaml" --seed 16 >/dev/null || exit 1
(cd "$tmp/big" && env -u SOURCE_DATE_EPOCH "$ps" screen --gate never --quiet -o out gen.yaml >/dev/null 2>"$tmp/big.err")
check "generated catalog of $n plants screened with every report" 0 $?
"$py" - "$tmp/big/out/gen.screen" "$n" "$src/reports/schema" <<'PY'
import csv, json, os, sys
from jsonschema.validators import validator_for
d, n, schemas = sys.argv[1], int(sys.argv[2]), sys.argv[3]
size = {ext: os.path.getsize(os.path.join(d, "gen.screen." + ext))
        for ext in ("json", "plants.jsonl", "md", "csv", "txt", "html")}
print("bytes a plant at N = %d: " % n + ", ".join("%s %.0f" % (k, v / n) for k, v in size.items()))
bad = []
if size["json"] >= 64 * 1024: bad.append("JSON summary %d bytes" % size["json"])
if size["plants.jsonl"] > 1750 * n: bad.append("JSON Lines %.0f bytes a plant" % (size["plants.jsonl"] / n))
if size["md"] >= 1 << 20: bad.append("Markdown %d bytes" % size["md"])
with open(os.path.join(d, "gen.screen.plants.jsonl"), encoding="utf-8") as f:
    lines = f.read().split("\n")
if lines[-1] != "" or len(lines) - 1 != n: bad.append("JSON Lines: %d lines for %d plants" % (len(lines) - 1, n))
rows = list(csv.reader(open(os.path.join(d, "gen.screen.csv"), newline="", encoding="utf-8")))
if len(rows) != n + 1: bad.append("CSV: %d rows for %d plants" % (len(rows) - 1, n))
doc = json.load(open(os.path.join(d, "gen.screen.json")))
if doc["plants_count"] != n or doc["plants_file"] != "gen.screen.plants.jsonl": bad.append("summary: %r" % doc["plants_file"])
if sum(b["plants"] for b in doc["severity_histogram"]) != n: bad.append("histogram does not add up")
md = open(os.path.join(d, "gen.screen.md"), encoding="utf-8").read()
if n > 200 and "Showing 200 of %d plants." % n not in md: bad.append("Markdown does not state its table cap")
if "`gen.screen.csv`" not in md or "`gen.screen.plants.jsonl`" not in md: bad.append("Markdown does not name the files")
# Every line is one JSON object with its rank; the summary and every 50th record against the
# schemas (draft 2020-12; every record of the smaller catalogs is validated in run.sh: python's
# validator takes about 2 ms a record).
S = json.load(open(os.path.join(schemas, "plantsieve-screening.schema.json")))
R = json.load(open(os.path.join(schemas, "plantsieve-screening-plant.schema.json")))
validator_for(S)(S).validate(doc)
v = validator_for(R)(R)
for i, line in enumerate(lines[:-1]):
    r = json.loads(line)
    if i % 50 == 0 or i == n - 1:
        v.validate(r)
    if r["rank"] != i + 1: bad.append("rank %r on line %d" % (r["rank"], i + 1)); break
print("\n".join(bad))
sys.exit(1 if bad else 0)
PY
check "sizes within bounds, one CSV row and one JSON line per plant, every record valid ($n plants)" 0 $?

# SOURCE_DATE_EPOCH: the date in the text, Markdown and JSON reports (1700000000 s is
# 2023-11-14T22:13:20Z, ISO 8601 / RFC 3339 UTC); without it, no date anywhere and two runs
# byte-identical, every file of the set (the same command line, run in two directories).
cat_nf="$src/tests/data/e2e/notes-flags.yaml"
for w in d1 d2 e1; do mkdir -p "$tmp/$w" && ln -s "$src/tests/data/e2e" "$tmp/$w/data"; done
(cd "$tmp/e1" && SOURCE_DATE_EPOCH=1700000000 "$ps" screen --gate never -o out data/notes-flags.yaml >/dev/null 2>&1)
check "SOURCE_DATE_EPOCH run" 0 $?
e="$tmp/e1/out/notes-flags.screen/notes-flags.screen"
contains "date in the text report" "$e.txt" "date: 2023-11-14T22:13:20Z"
contains "date in the Markdown report" "$e.md" "- Date: 2023-11-14T22:13:20Z"
contains "date in the JSON summary" "$e.json" '"date": "2023-11-14T22:13:20Z"'
for w in d1 d2; do
    (cd "$tmp/$w" && env -u SOURCE_DATE_EPOCH "$ps" screen --gate never -o out data/notes-flags.yaml >/dev/null 2>&1)
done
today=$(date -u +%Y-%m-%d)
for f in "$tmp/d1/out/notes-flags.screen/"*; do
    cmp -s "$f" "$tmp/d2/out/notes-flags.screen/${f##*/}"; check "two runs without SOURCE_DATE_EPOCH: ${f##*/} byte-identical" 0 $?
    grep -q -e "$today" -e "2023-11-14" "$f"; check "no date in ${f##*/} without SOURCE_DATE_EPOCH" 1 $?
done
[ "$(ls "$tmp/d1/out/notes-flags.screen" | wc -l)" -eq 7 ]; check "the set has its seven files (no families: txt csv json plants.jsonl md html junit.xml)" 0 $?

# The caution once in the Markdown, not doubled by a heading (demo and this catalog).
(cd "$tmp/d1" && ln -s "$src/catalogs" catalogs && "$ps" screen --gate never -o demo catalogs/demo-variants.yaml >/dev/null 2>&1)
for md in "$tmp/d1/out/notes-flags.screen/notes-flags.screen.md" "$tmp/d1/demo/demo-variants.screen/demo-variants.screen.md"; do
    [ "$(grep -o "Caution" "$md" | wc -l)" -eq 1 ]; check "Markdown: the word Caution once: $md" 0 $?
    contains "Markdown: the caution paragraph" "$md" "**Caution:** these floors are necessary conditions only."
done

# Notes and the structural flag (tests/data/e2e/notes-flags.yaml) in txt, md, csv and jsonl:
# the note as given (escaped per format), the flag only for zero-below-pole.
d="$tmp/d1/out/notes-flags.screen/notes-flags.screen"
"$py" - "$d" <<'PY'
import csv, json, sys
from screen_doc import read_records
d = sys.argv[1]
note = "=SUM(A1)\tcolumn two\nsecond line"
flag = "every stabilizing controller is itself unstable"
txt, md = open(d + ".txt", encoding="utf-8").read(), open(d + ".md", encoding="utf-8").read()
bad = []
def want(c, what):
    if not c: bad.append(what)
# text: control characters shown as escapes, never raw; the flag under the right plant
z = txt.split("  zero-below-pole  [")[1].split("\n\n")[0]
p = txt.split("  pole-below-zero  [")[1].split("\n\n")[0]
want("    note: =SUM(A1)\\tcolumn two\\nsecond line\n" in z, "txt note")
want(flag in " ".join(z.split()), "txt flag")
want(flag not in " ".join(p.split()) and "note:" not in p, "txt: flag or note on pole-below-zero")
want("\t" not in txt, "txt: a raw tab")
# Markdown: a tab and a line break become spaces; the flag in the detail of zero-below-pole only
mz = md.split("zero-below-pole (")[-1].split("\n### ")[0]
mp = md.split("pole-below-zero (")[-1].split("\n### ")[0]
want("- Note: =SUM(A1) column two second line\n" in mz, "md note")
want(flag in mz and flag not in mp, "md flag")
# CSV (RFC 4180): the note as given, behind the formula guard; the flag as true/false
rows = {r["id"]: r for r in csv.DictReader(open(d + ".csv", newline="", encoding="utf-8"))}
want(rows["zero-below-pole"]["note"] == "'" + note, "csv note %r" % rows["zero-below-pole"]["note"])
want(rows["pole-below-zero"]["note"] == "", "csv empty note")
want(rows["zero-below-pole"]["unstable_controller_required"] == "true", "csv flag")
want(rows["pole-below-zero"]["unstable_controller_required"] == "false", "csv no flag")
head = next(csv.reader(open(d + ".csv", newline="", encoding="utf-8")))
want(head[-18:-16] == ["note", "unstable_controller_required"] and head[-16] == "certificate", "csv: the two columns are the last before the 16 certificate columns")
# JSON Lines: the note exactly, the flag at the top of the record
doc, recs = read_records(d + ".json")
R = {r["id"]: r for r in recs}
want(R["zero-below-pole"]["note"] == note and R["pole-below-zero"]["note"] is None, "jsonl note")
want(R["zero-below-pole"]["unstable_controller_required"] is True, "jsonl flag")
want("unstable_controller_required" not in R["pole-below-zero"], "jsonl no flag: left out when false")
want(doc["run"]["title"] == "Notes and structure check" and len(doc["catalogs"][0]["sha256"]) == 64, "summary provenance")
print("\n".join(bad))
sys.exit(1 if bad else 0)
PY
check "notes and the structural flag in txt, md, csv and jsonl" 0 $?

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
