#!/bin/sh
# run.sh - end-to-end checks of the plantsieve command line on real catalog
# files: exit codes, stdout, stderr diagnostics, and the JSON document parsed
# back by Debian's python3. Usage: run.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
# The screening JSON (summary and JSON Lines records) read back: tests/e2e/screen_doc.py.
export PYTHONPATH="$src/tests/e2e"

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
# The YAML demo also holds a family (grid plants "<family>[...]"); CSV has no families.
pa = [strip(p) for p in a["plants"] if "[" not in p["id"]]
pb = [strip(p) for p in b["plants"]]
assert sum("[" in p["id"] for p in a["plants"]) == 6, "the demo family's six grid plants"
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
contains "explain shows the formula of the route taken (one RHP pole)" "$tmp/out" "prod_j |p + conj z_j|/|p - z_j| at the one RHP pole p"
contains "explain shows the attribution table" "$tmp/out" "[without_rhp_zeros] without the RHP zeros: 1 (lowers it: named in the cause)"
"$ps" explain glide-gap "$src/catalogs/demo-variants.yaml" >"$tmp/out" 2>"$tmp/err"; check "explain of a family id exits 0" 0 $?
contains "explain of a family id lists its grid plants" "$tmp/out" "'glide-gap' is a family of 6 plants; explain one of them:"
contains "explain of a family id lists its grid plants" "$tmp/out" "  glide-gap[gap=0.012]"
"$ps" explain nosuch "$cf" >"$tmp/out" 2>"$tmp/err"; check "explain: unknown id" 2 $?

# Claims that were once false (tests/data/e2e/claims.yaml says why each holds).
claims="$src/tests/data/e2e/claims.yaml"
"$ps" screen -o "$tmp/claims" --gate never "$claims" >"$tmp/out" 2>"$tmp/err"
check "screen: unstable plants without a bandwidth limit are not judged (exit 3, gate never)" 3 $?
"$py" - "$tmp/claims/claims.screen/claims.screen.json" "$tmp/claims/claims.screen/claims.screen.txt" <<'PY'
import json, math, re, sys
from screen_doc import load, target_line
doc = load(sys.argv[1])
text = open(sys.argv[2]).read()
P = {p["id"]: p for p in doc["plants"]}
assert doc["counts"]["per_verdict"]["needs-bandwidth"] == 2, doc["counts"]["per_verdict"]
for pid in ("rod-no-bw", "fast-no-bw"):
    assert P[pid]["verdict"] == "needs-bandwidth" and "no rolloff_start" in P[pid]["cause"], P[pid]["cause"]
    assert "no unstable pole" not in P[pid]["cause"]
# ranked apart: after every judged plant
ranks = [p["verdict"] for p in sorted(doc["plants"], key=lambda p: p["rank"])]
assert ranks[-2:] == ["needs-bandwidth"] * 2, ranks
# time to double of an RHP pair: ln 2 / Re p (the envelope of the oscillation)
ttd = P["wobble-pair"]["floors"]["time_to_double"]
assert len(ttd) == 1 and ttd[0]["pole"] == 0.5 and ttd[0]["imag"] == 6.0, ttd
assert abs(ttd[0]["seconds"] - math.log(2) / 0.5) < 1e-8 * 1.39, ttd   # 9 significant digits (record_digits)
ttd = P["effort-short"]["floors"]["time_to_double"]      # a real pole: ln 2 / p
assert len(ttd) == 1 and ttd[0]["pole"] == 2.0 and ttd[0]["imag"] == 0.0, ttd
assert abs(ttd[0]["seconds"] - math.log(2) / 2) < 1e-8 * 0.35, ttd
t = P["wobble-pair"]["targets"]["unstable_pole"]
scale = t["limit"] / t["now"]                  # every RHP pole scaled together
m = re.search(r"time to double ([0-9.]+) (ms|s)\)", target_line(text, "wobble-pair", "dominant unstable pole"))
got = float(m.group(1)) * (1e-3 if m.group(2) == "ms" else 1)
want = math.log(2) / (0.5 * scale)
assert abs(got - want) <= 5e-3 * want, (m.group(0), want)  # printed to 3 digits
# no floor limits the band edge of a stable delayed plant: the rule of thumb says so, marked
b = target_line(text, "slow-delay", "band edge")
assert "no floor limits it" in b and "rule of thumb, not a law: crossover below 2 rad/s" in b, b
# effort lever: 1/|G_s(2)| = |2 + 2| |2 + 5| / 1.5 (S&P 2nd ed. ch. 5, one RHP pole)
e = P["effort-short"]
assert e["worst"] == "effort" and abs(e["floors"]["effort"] - 4 * 7 / 1.5) < 1e-8 * 18.7, e["floors"]["effort"]
te = e["targets"]["effort_allowed"]
assert te["state"] == "found" and te["limit"] == e["floors"]["effort"] and te["now"] == 1, te
assert target_line(text, "effort-short", "allowed peak |C S|").startswith("allowed peak |C S| must reach 18.67")
# a zero on a pole: not stabilizable, and the zero target says how far it must move
c = P["cancel-exact"]
assert c["verdict"] == "not-stabilizable" and "moved off the other makes it stabilizable" in c["cause"], c["cause"]
assert c["targets"]["rhp_zero"]["state"] == "found" and c["targets"]["rhp_zero"]["limit"] > 3, c["targets"]
# one verb per direction in every target line, passing or failing
for line in re.findall(r"^    - (.*)$", text, re.M):
    assert not re.search(r"at most|at least|promise|largest passing|smallest passing", line), line
assert "e+03 ms" not in text and "an unstable poles" not in text
PY
check "claims: needs-bandwidth, time to double, rules of thumb, effort lever, movable cancellation" 0 $?
# A plant that fails with no band requirement at all gets no band edge: no band
# makes it pass (strider-d fails on its Mt floor, whatever the band).
"$py" - "$tmp/claims/claims.screen/claims.screen.json" "$src/reports/demo-variants.screen/demo-variants.screen.json" <<'PY'
import json, sys
from screen_doc import load
seen = 0
for f in sys.argv[1:]:
    for p in load(f)["plants"]:
        if p["verdict"] == "redesign" and p["requirements"]["band_edge"] is None:
            assert p["targets"]["band_edge"]["state"] == "no-value-passes", (p["id"], p["targets"]["band_edge"])
            seen += 1
assert seen >= 4, seen
PY
check "band edge target: none for a plant that fails without any band" 0 $?
"$ps" screen -o "$tmp/scr2" --gate never "$cf" >/dev/null 2>&1
for ext in txt csv json md html plants.jsonl; do
    same_run "$tmp/scr/closed-form.screen/closed-form.screen.$ext" "$tmp/scr2/closed-form.screen/closed-form.screen.$ext"; check "screen: $ext deterministic" 0 $?
done
# Thread-count invariance: the demo (with its family) on 1, 2 and 5 threads, byte for byte.
for t in 1 2 5; do
    "$ps" screen --threads $t -o "$tmp/thr$t" --gate never "$src/catalogs/demo-variants.yaml" >"$tmp/thr$t.out" 2>&1
    check "screen --threads $t" 0 $?
done
for t in 2 5; do
    same_run "$tmp/thr1.out" "$tmp/thr$t.out"; check "screen: stdout same on $t threads as on 1" 0 $?
    for ext in txt csv json md html plants.jsonl junit.xml; do
        same_run "$tmp/thr1/demo-variants.screen/demo-variants.screen.$ext" "$tmp/thr$t/demo-variants.screen/demo-variants.screen.$ext"
        check "screen: $ext same on $t threads as on 1" 0 $?
    done
done
contains "screen: the HTML first page names the command line" "$tmp/thr2/demo-variants.screen/demo-variants.screen.html" "command line: <code class=\"cmd\">plantsieve screen --threads 2 -o $tmp/thr2 --gate never $src/catalogs/demo-variants.yaml</code>"
"$ps" screen --threads 0 --no-files "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: --threads 0 is a usage error" 2 $?
# --detail: verdicts and ranking unchanged; targets only where asked.
"$ps" screen --detail none -o "$tmp/dnone" --gate never "$src/catalogs/demo-variants.yaml" >/dev/null 2>&1
check "screen --detail none" 0 $?
"$py" - "$tmp/thr1/demo-variants.screen/demo-variants.screen.json" "$tmp/dnone/demo-variants.screen/demo-variants.screen.json" <<'PY'
import json, sys
from screen_doc import load
a, b = (load(p) for p in sys.argv[1:3])
ka = [(p["id"], p["verdict"], p["severity"]) for p in a["plants"]]
kb = [(p["id"], p["verdict"], p["severity"]) for p in b["plants"]]
assert ka == kb, "ranking changed with --detail none"
assert all(t["state"] == "not-applicable" for p in b["plants"] for t in p["targets"].values()), "targets left"
PY
check "screen: --detail none keeps verdicts and ranking, drops targets" 0 $?
"$ps" screen --detail some --no-files "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: bad --detail is a usage error" 2 $?
# --show: the stdout listing is cut per section; the .txt report stays whole.
demo="$src/catalogs/demo-variants.yaml"
"$ps" screen --show 3 -o "$tmp/show3" --gate never "$demo" >"$tmp/show3.out" 2>&1; check "screen --show 3" 0 $?
"$py" - "$tmp/show3.out" "$tmp/thr1.out" "$tmp/show3/demo-variants.screen/demo-variants.screen.txt" <<'PY'
import re, sys
# the lines quoting the command line differ (--show 3): left out
cut, whole, txt = ("".join(l for l in open(p) if "plantsieve screen" not in l) for p in sys.argv[1:4])
rows = lambda t: re.findall(r"^ *\d+  \S+ +\S (?:clear|marginal|redesign|not-stabilizable|input-error) ", t, re.M)
n = len(rows(whole))
assert n > 3 and len(rows(cut)) == 3, (n, len(rows(cut)))
more = [int(m) for m in re.findall(r"^  \.\.\. and (\d+) more \(all of them in .*show3/demo-variants\.screen/demo-variants\.screen\.txt", cut, re.M)]
flag = int(re.search(r"redesign \((\d+)\)", whole).group(1))
passing = sum(int(x) for x in re.findall(r"(?:clear|marginal) (\d+)", whole.split("Counts:")[1]))
assert more == [n - 3, flag - 3, passing - 3], (more, n, flag, passing)
assert txt == whole, "the .txt report is cut too"
PY
check "screen: --show 3 cuts each section with the right counts, .txt whole" 0 $?
"$ps" screen --show all --no-files --gate never "$demo" >"$tmp/showall.out" 2>&1
grep -q "^  \.\.\. and" "$tmp/showall.out"; check "screen: --show all cuts nothing" 1 $?
"$ps" screen --show 2 --no-files --gate never "$cf" >"$tmp/out" 2>&1
grep -q "more (--show all prints them here)" "$tmp/out"; check "screen: --no-files cut names no file" 0 $?
"$ps" screen --show 0 --no-files "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen: --show 0 is a usage error" 2 $?
"$ps" screen --no-files --gate never --show 2 "$src/catalogs/broken/broken-entries.yaml" >"$tmp/out" 2>/dev/null
"$py" - "$tmp/out" <<'PY'
import re, sys
t = open(sys.argv[1]).read()
n = int(re.search(r"^Entries that could not be read \((\d+)\)", t, re.M).group(1))
part = t.split("Entries that could not be read")[1].split("\n\n")[0]
listed = re.findall(r"^  \S+:\d+:\d+: ", part, re.M)
assert n > 2 and len(listed) == 2 and f"... and {n - 2} more" in part, (n, len(listed))
PY
check "screen: --show 2 cuts the unreadable entries with the right count" 0 $?
# With --no-files a spilled run keeps only the rows its cut listing can print (rank heaps, no
# file): the listing must be the one of a run that keeps every row in memory, input errors too.
broken="$src/catalogs/broken/broken-entries.yaml"
for n in 1 3 10; do
    "$ps" screen --no-files --gate never --show $n "$demo" "$broken" >"$tmp/keep-mem.out" 2>&1
    for m in 1 4; do
        "$ps" screen --no-files --gate never --show $n --memory-rows $m "$demo" "$broken" >"$tmp/keep-top.out" 2>&1
        same_run "$tmp/keep-mem.out" "$tmp/keep-top.out"
        check "screen --no-files --show $n --memory-rows $m: same listing as in memory" 0 $?
    done
done
for t in 1 5; do
    "$ps" screen --no-files --gate never --show 3 --memory-rows 2 --threads $t "$demo" "$broken" >"$tmp/keep-t$t.out" 2>&1
done
same_run "$tmp/keep-t1.out" "$tmp/keep-t5.out"; check "screen --no-files keep mode: same listing on 1 and 5 threads" 0 $?
# Past the first chunks of a kept run the redesign targets and band curves of the plants are
# left for later (most rows are dropped) and computed once ranked for the rows the listing
# prints: 3000 generated plants (chunks of 512) must list the same targets as in memory.
if "$py" "$src/tests/bench/gen_catalog.py" 3000 "$tmp/gen3k.yaml" --seed 3 >/dev/null 2>&1; then
    for d in all flagged; do
        "$ps" screen --no-files --gate never --show 12 --detail $d "$tmp/gen3k.yaml" >"$tmp/defer-mem.out" 2>&1
        "$ps" screen --no-files --gate never --show 12 --detail $d --memory-rows 100 "$tmp/gen3k.yaml" >"$tmp/defer-top.out" 2>&1
        same_run "$tmp/defer-mem.out" "$tmp/defer-top.out"
        check "screen --no-files, 3000 plants, --detail $d: deferred targets as in memory" 0 $?
        grep -q "must stay below\|must reach" "$tmp/defer-top.out"
        check "screen --no-files, 3000 plants, --detail $d: targets are listed" 0 $?
    done
else
    echo "note: gen_catalog.py needs Debian's python3 with numpy and scipy: the deferred-detail case is left out"
fi
# Summaries beyond --memory-rows go to a temporary file: the same reports, byte for byte,
# whether the report files are written on one thread or on five at once (each thread
# reading the summaries back on its own).
for t in 1 5; do
    "$ps" screen --memory-rows 3 --threads $t -o "$tmp/spill$t" --gate never "$src/catalogs/demo-variants.yaml" \
        >"$tmp/spill$t.out" 2>&1
    check "screen --memory-rows 3 --threads $t" 0 $?
    same_run "$tmp/thr1.out" "$tmp/spill$t.out"; check "screen: stdout same with summaries on file ($t threads)" 0 $?
    for ext in txt csv json md html families.csv plants.jsonl junit.xml; do
        same_run "$tmp/thr1/demo-variants.screen/demo-variants.screen.$ext" \
            "$tmp/spill$t/demo-variants.screen/demo-variants.screen.$ext"
        check "screen: $ext same with summaries on file ($t threads)" 0 $?
    done
done
# Families: a CSV of the studies next to the other reports, only when the run has families.
"$py" - "$tmp/thr1/demo-variants.screen/demo-variants.screen.families.csv" "$tmp/thr1/demo-variants.screen/demo-variants.screen.json" <<'PY'
import csv, json, sys
rows = list(csv.DictReader(open(sys.argv[1], newline="")))
fams = json.load(open(sys.argv[2]))["families"]
want = sum(len(f["boundaries"]) + (f["yield"] is not None) for f in fams)
assert len(rows) == want and want >= 2, (len(rows), want)
b = [r for r in rows if r["study"] == "boundary"][0]
assert abs(float(b["value"]) - fams[0]["boundaries"][0]["value"]) <= 1e-8 * abs(float(b["value"])), b
PY
check "screen: families CSV parsed back, one row per study" 0 $?
[ -e "$tmp/scr/closed-form.screen/closed-form.screen.families.csv" ]; check "screen: no families CSV without families" 1 $?
# Broken families: each one an entry error naming line, column and what was expected; the rest screened.
"$ps" screen --no-files --gate never "$src/tests/data/e2e/bad-families.yaml" >"$tmp/out" 2>"$tmp/err"
check "screen: broken families are entry errors (exit 3)" 3 $?
contains "family: missing parameters" "$tmp/err" "bad-families.yaml:8:5: plant 'no-params': family 'no-params': 'parameters' is missing"
contains "family: sweep order" "$tmp/err" "plant 'bad-sweep': sweep of 'a': expected from < to"
contains "family: assignment refused with its position" "$tmp/err" "in \"a=5\" at character 2"
contains "family: invalid operation names the values" "$tmp/err" "plant 'sqrtneg[a=-1]': poles: \"-sqrt(a)\": invalid operation"
contains "family: the good grid point still screened" "$tmp/out" "sqrtneg[a=1]"
contains "family: the plain plant still screened" "$tmp/out" "ok "
contains "family: max below min, with its position" "$tmp/err" "bad-families.yaml:43:75: plant 'bad-range': parameter 'a': max 1 must be above min 2"
contains "family: a range needs a tolerance" "$tmp/err" "bad-families.yaml:46:41: plant 'range-no-tol': parameter 'a': min and max bound the values drawn for a yield study, but it has no tolerance"
# Family studies in every format: which floor binds at a boundary and what the figure draws
# (delay-pole: the Mt floor e^{p theta}, S&P 2nd ed. ch. 5; weak-drive: the effort floor
# 2p(p+60)/k, same chapter; two-ends: the severity), ranged
# draws counted as redrawn, invalid units counted apart with a warning line.
fam="$src/tests/data/e2e/families.yaml"
"$ps" screen -o "$tmp/fam" --gate never "$fam" >"$tmp/fam.out" 2>"$tmp/fam.err"; check "screen: families catalog" 0 $?
contains "family text: the Mt floor binds, with its allowed value" "$tmp/fam/families.screen/families.screen.txt" \
    "theta must stay below 0.0603091 (nominal 0.03, swept 0.005 .. 0.12); there the severity crosses 1, set by the Mt floor: 1.25 passing, 1.25 failing, allowed 1.25"
contains "family text: redrawn draws" "$tmp/fam/families.screen/families.screen.txt" "gap drawn from its normal distribution truncated to >= 0 (97.7 % of it): "
contains "family text: warning line on invalid units" "$tmp/fam/families.screen/families.screen.txt" "    warning   "
"$py" - "$tmp/fam/families.screen/families.screen" <<'PY'
import csv, json, math, re, sys
from html.parser import HTMLParser
stem = sys.argv[1]
doc = json.load(open(stem + ".json"))
F = {f["id"]: f for f in doc["families"]}
rows = {(r["family"], r["study"]): r for r in csv.DictReader(open(stem + ".families.csv", newline=""))}
txt = open(stem + ".txt").read()
md = open(stem + ".md").read()
html = open(stem + ".html").read()

# delay-pole: the boundary at ln(1.25)/p, set by the Mt floor; the Ms floor there is far below 2.
b = F["delay-pole"]["boundaries"][0]
want = math.log(1.25) / 3.7
assert abs(b["value"] - want) <= 1e-6 * want, (b["value"], want)
assert b["binding"] == "Mt" and b["allowed"] == {"ms": 2, "mt": 1.25, "effort": None}, b
assert b["mt_floor_passing"] <= 1.25 < b["mt_floor_failing"] and b["ms_floor_failing"] < 2, b
assert b["curve"]["plotted"] == "Mt", b["curve"]["plotted"]
r = rows[("delay-pole", "boundary")]
assert r["binding"] == "Mt" and float(r["binding_allowed"]) == 1.25, r
for q in ("ms", "mt", "effort"):
    for side in ("passing", "failing"):
        k = "%s_floor_%s" % (q, side)
        assert abs(float(r[k]) - b[k]) <= 1e-8 * b[k], (k, r[k], b[k])
b = F["weak-drive"]["boundaries"][0]
want = 2 * 3.7 * 63.7 / 2.385
assert abs(b["value"] - want) <= 1e-6 * want and b["binding"] == "effort" and b["curve"]["plotted"] == "effort", b
assert rows[("weak-drive", "boundary")]["binding"] == "effort" and float(rows[("weak-drive", "boundary")]["binding_allowed"]) == 2.385
assert F["two-ends"]["boundaries"][0]["curve"]["plotted"] == "severity"
assert rows[("two-ends", "boundary")]["binding"] == "", "no single boundary, no binding floor"

# The HTML figures draw what the JSON says, and no failing point below the line it is compared with.
class Fig(HTMLParser):
    def __init__(self):
        super().__init__()
        self.figs, self.cur, self.pt = [], None, None
    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "figure" and "family-boundary" in (a.get("class") or ""):
            self.cur = {"family": a["data-family"], "plotted": a["data-plotted"], "line": None, "points": []}
            self.figs.append(self.cur)
        elif self.cur is not None and tag == "line" and "data-allowed" in a:
            self.cur["line"] = (float(a["data-allowed"]), float(a["y1"]))
        elif self.cur is not None and tag == "g" and a.get("class") == "sweep-point":
            self.pt = {"x": float(a["data-x"]), "value": float(a["data-value"]), "passes": a["data-passes"] == "yes"}
            self.cur["points"].append(self.pt)
        elif self.pt is not None and tag == "circle":
            self.pt["y"] = float(a["cy"])
        elif self.pt is not None and tag == "rect":
            self.pt["y"] = float(a["y"]) + 4
    def handle_endtag(self, tag):
        if tag == "g":
            self.pt = None
        if tag == "figure":
            self.cur = None
p = Fig()
p.feed(html)
key = {"Ms": "ms_floor", "Mt": "mt_floor", "effort": "effort_floor", "severity": "severity"}
allowed = {"Ms": "ms", "Mt": "mt", "effort": "effort"}
assert [f["family"] for f in p.figs] == ["delay-pole", "weak-drive", "two-ends"], p.figs
for fig in p.figs:
    c = F[fig["family"]]["boundaries"][0]
    cur = c["curve"]
    assert fig["plotted"] == cur["plotted"], fig["plotted"]
    want_line = 1.0 if cur["plotted"] == "severity" else c["allowed"][allowed[cur["plotted"]]]
    assert fig["line"] and fig["line"][0] == want_line, (fig["line"], want_line)
    ly = fig["line"][1]
    assert len(fig["points"]) == len(cur["x"])
    assert all(abs(q["x"] - x) <= 1e-12 * abs(x) for q, x in zip(fig["points"], cur["x"])), fig["points"]
    fails = 0
    for q, v, ok in zip(fig["points"], cur[key[cur["plotted"]]], cur["passes"]):
        assert abs(q["value"] - v) <= 1e-12 * abs(v) and q["passes"] == ok, (q, v, ok)
        if ok:
            assert q["y"] >= ly, ("a passing point above the line", fig["family"], q, ly)
        else:
            fails += 1
            assert q["y"] <= ly, ("a failing point below the line", fig["family"], q, ly)
    assert fails >= 3, fig

# Ranged draws: none outside, the redrawn draws counted in every format; no invalid unit.
y = F["gap-ranged"]["yield"]
d = y["drawn"][0]
assert F["gap-ranged"]["parameters"][0]["range"] == {"min": 0, "max": None, "mass": F["gap-ranged"]["parameters"][0]["range"]["mass"]}
assert abs(F["gap-ranged"]["parameters"][0]["range"]["mass"] - 0.9772498680518208) < 1e-12
assert d["parameter"] == "gap" and d["min"] >= 0 and d["redrawn"] > 0 and y["redrawn_draws"] == d["redrawn"], y
assert y["invalid_units"] == 0 and y["valid_units"] == 1000 and y["warning"] is None, y
assert rows[("gap-ranged", "yield")]["redrawn_draws"] == str(d["redrawn"])
assert "%d draws outside redrawn" % d["redrawn"] in txt
assert rows[("gap-ranged", "yield")]["invalid_units"] == "0" and rows[("gap-ranged", "yield")]["warning"] == ""

# Invalid units: counted apart, out of the shares, a warning in every format.
y = F["gap-unranged"]["yield"]
n = y["invalid_units"]
assert n > 0 and y["valid_units"] + n == 1000 and y["drawn"][0]["min"] < 0, y
passing = y["per_verdict"]["clear"]["count"] + y["per_verdict"]["marginal"]["count"]
assert sum(v["count"] for v in y["per_verdict"].values()) == y["valid_units"], y["per_verdict"]
assert "input-error" not in y["per_verdict"]
assert abs(y["passing"]["fraction"] - passing / y["valid_units"]) < 1e-15, y["passing"]
w = "%d of 1000 units could not be evaluated (invalid units, left out of every share)" % n
assert y["warning"].startswith(w), y["warning"]
r = rows[("gap-unranged", "yield")]
assert r["invalid_units"] == str(n) and r["valid_units"] == str(1000 - n) and r["warning"].startswith(w), r
assert re.search(r"^    warning   " + re.escape(w), txt, re.M), "text warning line"
md_rows = [l for l in md.split("\n") if l.startswith("| gap-unranged | warning | ")]
assert len(md_rows) == 1 and md_rows[0][len("| gap-unranged | warning | "):].startswith(w), "Markdown warning row"
assert '<p class="study-warning"><strong>Warning:</strong> ' + w in html, "HTML warning"
for t in (txt, md, html, open(stem + ".families.csv").read()):
    assert "spreads" not in t
print("families: ok")
PY
check "family studies: binding floor, plotted series, ranged draws and invalid units in every format" 0 $?
ls -A "$tmp/scr" | grep -q '^\.' ; check "screen: no temporary file left" 1 $?
"$py" -c '
import csv, json, math, sys
from screen_doc import load
d = load(sys.argv[1])
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
' "$tmp/scr/closed-form.screen/closed-form.screen.json" "$tmp/scr/closed-form.screen/closed-form.screen.csv"; check "screen: closed-form verdicts, ranking and targets" 0 $?
# Floors too large for a double but finite (issue 14, finding 1): carried in
# logarithms, a redesign with a finite severity and a true cause, never "not
# stabilizable"; an exact cancellation still is. Closed forms in the catalog's
# header: e^{p theta} for one RHP pole with delay (S&P 2nd ed. 2005, ch. 5) and
# exp(pi p / w_h) for the band floor with delta = 0 (Stein 2003).
"$ps" screen -o "$tmp/ovf" --gate never "$src/tests/data/e2e/overflow.yaml" >"$tmp/out" 2>"$tmp/err"
check "screen: overflowing floors screen without error" 0 $?
contains "listing prints an overflowing floor as a power of ten (e^1000 = 1.97e+434)" "$tmp/ovf/overflow.screen/overflow.screen.txt" "1.97e+434"
"$py" - "$tmp/ovf/overflow.screen/overflow.screen.json" "$tmp/ovf/overflow.screen/overflow.screen.csv" <<'PY'
import csv, json, math, sys
from screen_doc import load
doc = load(sys.argv[1])
rows = {r["id"]: r for r in csv.DictReader(open(sys.argv[2], newline=""))}
by = {p["id"]: p for p in doc["plants"]}
def close(a, b, rel=1e-8):   # the plant records carry 9 significant digits (record_digits)
    return a is not None and abs(a - b) <= rel * abs(b)
bad = []
def want(cond, what):
    if not cond:
        bad.append(what)
for pid, ln_floor, factor, words in (("pole-long-delay", 1.0 * 1000.0, "delay", "delay 1e+03 s"),
                                     ("pole-far", math.pi * 1.0e8 / 10.0, "rolloff_start", "available bandwidth 10 rad/s")):
    p = by[pid]
    f, q = p["floors"], p["requirements"]
    # Mt >= Ms - 1 and Ms >= Mt - 1: past 1e308 both share the one logarithm.
    sev = max(ln_floor / math.log(q["peak_s_allowed"]), ln_floor / math.log(q["peak_t_allowed"]))
    want(p["verdict"] == "redesign", pid + ": verdict " + p["verdict"])
    want(close(p["severity"], sev), "%s: severity %r, closed form %r" % (pid, p["severity"], sev))
    want(close(float(rows[pid]["severity"]), sev, 1e-8), pid + ": CSV severity " + rows[pid]["severity"])  # "%.9g"
    want(f["infinite"] is False, pid + ": infinite")
    for key in ("ms", "mt"):
        want(f[key] is None and close(f.get(key + "_log10"), ln_floor / math.log(10)),
             "%s: %s %r, %s_log10 %r" % (pid, key, f[key], key, f.get(key + "_log10")))
        want(f["reasons"].get(key, "").startswith("finite but past"), pid + ": reason for " + key)
    want(close(p["attribution"]["floor_log10"], ln_floor / math.log(10)), pid + ": attribution floor_log10")
    want(p["attribution"]["factors"][0]["factor"] == factor and p["attribution"]["factors"][0]["lowers"],
         pid + ": first factor " + repr(p["attribution"]["factors"]))
    want(p["cause"].startswith(words) and "coincide" not in p["cause"] and "hidden" not in p["cause"],
         pid + ": cause " + p["cause"])
want(close(by["pole-long-delay"]["floors"].get("mt_interpolation_log10"), 1000 / math.log(10)), "delay: Mt interpolation log10")
want(close(by["pole-far"]["floors"].get("ms_band_log10"), math.pi * 1e7 / math.log(10)), "far: band log10")
want(by["pole-far"]["floors"]["limiting"] == "band", "far: limiting")
c = by["cancel"]
want(c["verdict"] == "not-stabilizable" and c["floors"]["infinite"] is True and c["floors"]["ms"] is None
     and "ms_log10" not in c["floors"], "cancel: " + repr((c["verdict"], c["floors"]["infinite"])))
print("\n".join(bad))
sys.exit(1 if bad else 0)
PY
check "screen: overflowing floors are finite redesigns with closed-form severity and log10; a cancellation stays infinite" 0 $?
# A plant far faster than its roll-off start fails with any band: its band
# target and band curve stay below w_h (the range once started above its end).
"$py" - "$tmp/ovf/overflow.screen/overflow.screen.json" <<'PY'
import json, sys
from screen_doc import load
P = {p["id"]: p for p in load(sys.argv[1])["plants"]}
p = P["pole-far"]
assert p["targets"]["band_edge"]["state"] == "no-value-passes", p["targets"]["band_edge"]
wh = p["requirements"]["rolloff_start"]
assert all(w < wh for w in p["band_curve"]["band_edge"]), p["band_curve"]["band_edge"]
PY
check "band target and curve of a plant far faster than w_h stay below w_h" 0 $?

# The committed demo reports are what the README's command writes now: the same command line
# (the reports quote it), run where catalogs/ is the source's, without SOURCE_DATE_EPOCH.
mkdir -p "$tmp/w" && ln -s "$src/catalogs" "$tmp/w/catalogs"
(cd "$tmp/w" && env -u SOURCE_DATE_EPOCH "$ps" screen --gate never --certify passing catalogs/demo-variants.yaml >/dev/null 2>&1)
ln -s "$tmp/w/reports" "$tmp/demo"
for ext in txt csv json md html families.csv plants.jsonl junit.xml; do
    cmp -s "$tmp/demo/demo-variants.screen/demo-variants.screen.$ext" "$src/reports/demo-variants.screen/demo-variants.screen.$ext"; check "committed demo report $ext is current" 0 $?
done
(cd "$tmp/w" && "$ps" certify catalogs/demo-variants.yaml >"$tmp/demo-certify.txt" 2>/dev/null)
cmp -s "$tmp/demo-certify.txt" "$src/reports/demo-certify.txt"; check "committed demo certify report is current" 0 $?

# screen --certify: the bracket of each plant is the certify command's search (same seed, same
# controller; certify_scipy checks those controllers with scipy), the outcome counts agree across
# the text, JSON, CSV and JSON Lines reports, and the reports are the same for 1 and 2 threads.
(cd "$tmp/w" && "$ps" certify --json catalogs/demo-variants.yaml >"$tmp/demo-certify.json" 2>/dev/null)
"$ps" screen --gate never --certify passing --threads 1 -o "$tmp/cert1" "$src/catalogs/demo-variants.yaml" >/dev/null 2>&1
"$ps" screen --gate never --certify passing --threads 2 -o "$tmp/cert2" "$src/catalogs/demo-variants.yaml" >/dev/null 2>&1
cmp -s "$tmp/cert1/demo-variants.screen/demo-variants.screen.plants.jsonl" "$tmp/cert2/demo-variants.screen/demo-variants.screen.plants.jsonl"
check "screen --certify: the same records on 1 and 2 threads" 0 $?
"$py" - "$tmp/demo-certify.json" "$tmp/cert1/demo-variants.screen/demo-variants.screen" <<'PY'
import csv, json, re, sys
cert = json.load(open(sys.argv[1]))
base = sys.argv[2]
plants = cert["plants"] if isinstance(cert, dict) else cert
by_id = {p["id"]: p for p in plants}
recs = [json.loads(l) for l in open(base + ".plants.jsonl")]
doc = json.load(open(base + ".json"))
bad = []
counts = {"ruled out": 0, "demonstrated": 0, "undecided": 0, "not attempted": 0}
compared = 0
for r in recs:
    c = r.get("certificate")
    if r["verdict"] in ("clear", "marginal", "redesign", "not-stabilizable"):
        if c is None:
            bad.append("no certificate for " + r["id"]); continue
        counts[c["outcome"]] += 1
        if r["verdict"] in ("redesign", "not-stabilizable") and c["outcome"] != "ruled out":
            bad.append("flagged plant not ruled out: " + r["id"])
    if c is None or r["id"] not in by_id or "controller" not in c:
        continue
    other = by_id[r["id"]].get("controller")
    if not other:
        bad.append("certify found no controller for " + r["id"]); continue
    for key in ("num", "den"):
        a, b = c["controller"][key], other[key]
        if len(a) != len(b) or any(abs(x - y) > 1e-12 * max(1.0, abs(y)) for x, y in zip(a, b)):
            bad.append("%s %s differs: %s / %s" % (r["id"], key, a, b))
    if c["outcome"] == "demonstrated" and by_id[r["id"]]["outcome"] != "demonstrated":
        bad.append("outcome differs for " + r["id"])
    compared += 1
if counts != doc.get("bracket"):
    bad.append("json bracket %s, records %s" % (doc.get("bracket"), counts))
rows = list(csv.DictReader(open(base + ".csv", newline="", encoding="utf-8")))
csv_counts = {k: sum(1 for x in rows if x["certificate"] == k) for k in counts}
if csv_counts != counts:
    bad.append("csv %s, records %s" % (csv_counts, counts))
txt = open(base + ".txt", encoding="utf-8").read()
m = re.search(r"(\d+) demonstrated, (\d+) undecided, (\d+) ruled out, (\d+) not attempted", txt)
if not m or [int(g) for g in m.groups()] != [counts[k] for k in ("demonstrated", "undecided", "ruled out", "not attempted")]:
    bad.append("txt counts line")
if compared < 10:
    bad.append("only %d controllers compared" % compared)
# a found peak below a floor only where the controller misses a requirement the floor assumes
for r in recs:
    c = r.get("certificate") or {}
    f = c.get("found")
    if f and not f.get("meets") and (f["ms"] < r["floors"]["ms"] or f["mt"] < r["floors"]["mt"]):
        if not re.search(r"band|roll-off", f.get("why", "")):
            bad.append("%s: found peaks below the floors, missing %s" % (r["id"], f.get("why")))
    if f and f.get("meets") and not f.get("upper_bound"):
        bad.append("%s: meets every requirement but is not marked an upper bound" % r["id"])
    if f and f.get("upper_bound") and (f["ms"] < r["floors"]["ms"] * (1 - 1e-9) or f["mt"] < r["floors"]["mt"] * (1 - 1e-9)):
        bad.append("%s: a controller meeting roll-off, band and effort below the floors" % r["id"])
for line in txt.splitlines():
    if re.match(r"  \S+ +undecided ", line) and "none found" not in line and "(misses " not in line:
        bad.append("txt bracket row without the requirement missed: " + line.strip())
if "The floors hold for loops that meet" not in " ".join(txt.split()):
    bad.append("txt: the floors' condition is not stated")
print("\n".join(bad))
sys.exit(1 if bad else 0)
PY
check "screen --certify: outcomes agree across formats and controllers are certify's" 0 $?
"$ps" screen --budget 500 --no-files "$src/catalogs/demo-variants.yaml" >/dev/null 2>"$tmp/err"; check "screen --budget without --certify is a usage error" 2 $?

# The progress line on a terminal (script(1) from bsdutils gives one) says nothing false: a
# catalog with families has more plants than entries, so no "N of M" there, and certify
# counts the plants it searched.
if command -v script >/dev/null 2>&1; then
    script -qc "'$ps' screen --no-files --gate never '$src/catalogs/demo-variants.yaml' >/dev/null" /dev/null </dev/null \
        | tr '\r' '\n' >"$tmp/prog.screen"
    grep -q "screened 31 plants" "$tmp/prog.screen" && ! grep -q " of 26 plants" "$tmp/prog.screen"
    check "screen's progress line with families counts the plants screened, no total" 0 $?
    script -qc "'$ps' certify '$src/catalogs/demo-variants.yaml' >/dev/null" /dev/null </dev/null | tr '\r' '\n' >"$tmp/prog.cert"
    grep -q "searched 31 plants" "$tmp/prog.cert"; check "certify's progress line counts the plants searched" 0 $?
fi

# The screening JSON validates against its schemas (python3-jsonschema): the summary against
# plantsieve-screening.schema.json, every line of its JSON Lines file against
# plantsieve-screening-plant.schema.json; the references are all inside each schema (nothing is
# fetched). Each line is one JSON object and the file has one line per plant.
for doc in "$tmp/scr/closed-form.screen/closed-form.screen.json" "$tmp/demo/demo-variants.screen/demo-variants.screen.json" \
           "$tmp/scr/broken-entries.screen/broken-entries.screen.json" "$tmp/fam/families.screen/families.screen.json" "$tmp/ovf/overflow.screen/overflow.screen.json" \
           "$tmp/claims/claims.screen/claims.screen.json" "$tmp/cut/cut-structure.screen/cut-structure.screen.json"; do
    [ -e "$doc" ] || "$ps" screen -o "$tmp/cut" --gate never "$src/tests/data/e2e/cut-structure.yaml" >/dev/null 2>&1
    "$py" -c '
import json, sys, jsonschema
from jsonschema.validators import validator_for
from screen_doc import read_records
summary, record = (json.load(open(f)) for f in sys.argv[1:3])
for schema in (summary, record):
    validator_for(schema).check_schema(schema)
    resolver = jsonschema.RefResolver.from_schema(schema)
    def no_fetch(uri):
        sys.exit("schema reference not resolved locally: " + uri)
    resolver.resolve_remote = no_fetch
    schema["_v"] = validator_for(schema)(schema, resolver=resolver)
doc, recs = read_records(sys.argv[3])
summary["_v"].validate(doc)
for r in recs:
    record["_v"].validate(r)
assert [r["rank"] for r in recs] == list(range(1, len(recs) + 1))
assert len(recs) == doc["counts"]["entries"], (len(recs), doc["counts"])
' "$src/reports/schema/plantsieve-screening.schema.json" "$src/reports/schema/plantsieve-screening-plant.schema.json" "$doc"
    check "screening JSON summary and every JSON Lines record validate: $doc" 0 $?
done

# The Markdown ranking parsed back: one row per plant, same ids in the same
# order as the CSV report, every row as many cells as the header.
for stem in "$tmp/scr/closed-form" "$tmp/demo/demo-variants"; do
    "$py" - "$stem.screen/${stem##*/}.screen.md" "$stem.screen/${stem##*/}.screen.csv" <<'PY'
import csv, sys
lines = open(sys.argv[1], encoding="utf-8").read().split("\n")
start = lines.index("## Ranking")
table = []
for line in lines[start + 1:]:
    if line.startswith("## "):
        break
    if line.startswith("|"):
        table.append(line)
    elif table:
        break
def cells(row):  # split on unescaped '|'; a backslash escapes ASCII punctuation
    assert row.startswith("|") and row.endswith("|") and not row.endswith("\\|"), row
    out, cur, i = [], "", 1
    while i < len(row) - 1:
        c = row[i]
        if c == "\\" and i + 1 < len(row) and not row[i + 1].isalnum():
            cur += row[i + 1]; i += 2; continue
        if c == "|":
            out.append(cur.strip()); cur = ""
        else:
            cur += c
        i += 1
    out.append(cur.strip())
    return out
head, rule, rows = cells(table[0]), cells(table[1]), [cells(r) for r in table[2:]]
assert head[:2] == ["Rank", "Plant"], head
assert all(set(c) <= set("-:") and c for c in rule), rule
widths = {len(head), len(rule)} | {len(r) for r in rows}
assert widths == {len(head)}, widths
ref = list(csv.DictReader(open(sys.argv[2], newline="", encoding="utf-8")))
ref = ref[:200]                   # the table shows the first 200 (PS_MD_TABLE_MAX)
assert [r[1] for r in rows] == [r["id"] for r in ref], ([r[1] for r in rows], [r["id"] for r in ref])
assert [r[0] for r in rows] == [r["rank"] for r in ref] == [str(i + 1) for i in range(len(ref))]
marks = {"clear": "\u25cb", "marginal": "\u25d0", "redesign": "\u25cf", "not-stabilizable": "\u2716",
         "needs-bandwidth": "\u25b3", "input-error": "\u25a1"}
assert [r[2] for r in rows] == [marks[r["verdict"]] + " " + r["verdict"] for r in ref]
PY
    check "Markdown ranking matches the CSV: $stem" 0 $?
done

# Cause by attribution. one-pole-tight: band floor exp(pi p / w_h) (Stein 2003)
# = exp(12 pi / 40) = 2.566, so Mt >= 1.566 > 1.25 allowed (||T|| >= ||S|| - 1)
# while its own Mt floors are 1: unlimited bandwidth takes the Mt floor to 1.
contains "cause names the bandwidth with the figure its relaxation gives" "$tmp/scr/closed-form.screen/closed-form.screen.csv" \
    "available bandwidth 40 rad/s with the unstable pole 12 rad/s: Mt floor 1.57 against 1.25 allowed (1 with unlimited bandwidth)"
"$py" - "$tmp/scr/closed-form.screen/closed-form.screen.json" "$tmp/demo/demo-variants.screen/demo-variants.screen.json" <<'PY'
import json, math, re, sys
from screen_doc import load
P = {p["id"]: p for p in load(sys.argv[1])["plants"]}
fl = P["one-pole-tight"]["floors"]
assert abs(fl["ms"] - math.exp(12 * math.pi / 40)) <= 1e-8 * fl["ms"], fl["ms"]   # 9 significant digits
assert abs(fl["mt"] - (fl["ms"] - 1)) <= 1e-8 * fl["ms"] and fl["limiting"] == "band", fl
assert P["one-pole-tight"]["worst"] == "Mt"
# Everywhere: the attribution's binding floor is the floor the verdict names,
# every factor the cause names lowers it, and the first one is named first.
words = {"delay": r"(?<!computation )delay ", "rhp_zeros": r"RHP zero|zeros? outside the unit circle",
         "rolloff_start": "available bandwidth", "band": "required band", "compute_delay": "computation delay",
         "sample_rate": "sample rate", "sampling_zeros": "sampling zero"}
def find(text, pattern):
    m = re.search(pattern, text)
    return m.start() if m else -1
for f in sys.argv[1:]:
    for p in load(f)["plants"]:
        a = p["attribution"]
        if a is None or p["verdict"] in ("not-stabilizable", "needs-bandwidth"):
            continue
        assert a["binding"] == p["worst"], (p["id"], a, p["worst"])
        if a["binding"] == "none":
            assert p["cause"].startswith("no floor above 1"), (p["id"], p["cause"])
            continue
        key = {"Ms": "ms", "Mt": "mt", "effort": "effort"}[a["binding"]]
        assert a["floor"] == p["floors"][key], (p["id"], a, p["floors"][key])
        named = [x for x in a["factors"] if x["lowers"]]
        for x in named:
            assert x["floor_without"] < a["floor"], (p["id"], x)
        if named:
            first = words[named[0]["factor"]]
            pos = [find(p["cause"], words[x["factor"]]) for x in named]
            assert min(pos) >= 0 and pos[0] == min(pos), (p["id"], p["cause"], named)
PY
check "cause names the factors the attribution ranks, in its order" 0 $?

# Colour: only on a terminal and only without NO_COLOR (https://no-color.org).
esc=$(printf '\033')
"$ps" screen --no-files --gate never "$cf" 2>"$tmp/piped.err" | cat >"$tmp/piped"
grep -qF "plants/s" "$tmp/piped.err"; check "screen: no progress line when stderr is not a terminal" 1 $?
grep -qF "$esc" "$tmp/piped"; check "screen: piped output has no ESC byte" 1 $?
# script(1) (util-linux, Debian package bsdutils, Essential) runs the command on a pseudo-terminal.
if command -v script >/dev/null 2>&1 && script -qec true /dev/null </dev/null >/dev/null 2>&1; then
    ttycmd="'$ps' screen -o '$tmp/tty' --gate never '$cf'"
    script -qec "$ttycmd" /dev/null </dev/null >"$tmp/tty.out" 2>&1; check "screen under a pseudo-terminal" 0 $?
    grep -qF "$esc[" "$tmp/tty.out"; check "screen: terminal output has ESC[ sequences" 0 $?
    grep -qF "$esc" "$tmp/tty/closed-form.screen/closed-form.screen.txt"; check "screen: .txt report has no ESC even on a terminal" 1 $?
    NO_COLOR=1 script -qec "$ttycmd" /dev/null </dev/null >"$tmp/tty.out" 2>&1; check "screen with NO_COLOR=1 under a pseudo-terminal" 0 $?
    grep -qF "$esc" "$tmp/tty.out"; check "screen: NO_COLOR=1 on a terminal gives no ESC byte" 1 $?
    NO_COLOR= script -qec "$ttycmd" /dev/null </dev/null >"$tmp/tty.out" 2>&1
    grep -qF "$esc[" "$tmp/tty.out"; check "screen: empty NO_COLOR still colours a terminal" 0 $?
    # Progress on stderr: on a terminal only, silenced by --quiet, never in the reports.
    script -qec "'$ps' screen --no-files --gate never '$cf'" /dev/null </dev/null >"$tmp/tty.out" 2>&1
    contains "screen: progress line on a terminal" "$tmp/tty.out" "plants/s, about"
    script -qec "'$ps' screen --quiet --no-files --gate never '$cf'" /dev/null </dev/null >"$tmp/tty.out" 2>&1
    grep -qF "plants/s" "$tmp/tty.out"; check "screen: --quiet hides the progress line" 1 $?
    grep -qF "plants/s" "$tmp/tty/closed-form.screen/closed-form.screen.txt"; check "screen: no progress in the .txt report" 1 $?
else
    echo "SKIP: colour on a terminal (script(1) missing or no pseudo-terminal available)"
fi

# Hostile text cells (catalogs/broken/hostile-rows.csv): invalid UTF-8 and
# control characters refused with file:line:col, a short row named where it
# ends, 1e-400 refused; formula-like ids guarded in the CSV report only.
hr="$src/catalogs/broken/hostile-rows.csv"
"$ps" survey --json "$hr" >"$tmp/hr.json" 2>"$tmp/err"; check "hostile rows: entry errors (exit 3)" 3 $?
contains "invalid UTF-8 id refused at file:line:col" "$tmp/err" "$hr:3:1: id: not valid UTF-8 (byte 0xFF at character 7)"
contains "escape in an id refused" "$tmp/err" "$hr:4:1: id: control character U+001B at character 7"
contains "short row named where it ends" "$tmp/err" "$hr:5:3: plant 'glide-short': row has 3 fields, the header has 5"
contains "underflow refused, field named" "$tmp/err" "$hr:6:3: plant 'glide-tiny': poles: item 2: nonzero number too small"
contains "invalid UTF-8 note refused" "$tmp/err" "$hr:7:2: plant 'glide-note': note: not valid UTF-8 (byte 0xC3 at character 22)"
"$ps" survey "$hr" >"$tmp/out" 2>>"$tmp/err"
if LC_ALL=C grep -q "$(printf '[\001-\010\013-\037\177]')" "$tmp/out" "$tmp/err"; then fail=$((fail + 1)); echo "FAIL: a control character reached the terminal"; else pass=$((pass + 1)); fi
grep -qxF "  error  row has 3 fields, the header has 5: it ends after column 3 (poles); write an empty cell for a value not given" "$tmp/out"
check "survey text: a row-level error names no empty field" 0 $?
"$py" - "$tmp/hr.json" "$src/reports/schema/plantsieve-survey.schema.json" <<'PY'
import json, sys, jsonschema
raw = open(sys.argv[1], "rb").read()
raw.decode("utf-8")                          # the document is valid UTF-8
d = json.loads(raw)
jsonschema.validate(d, json.load(open(sys.argv[2])))
assert d["counts"] == {"entries": 8, "models": 3, "errors": 5}, d["counts"]
ids = [p["id"] for p in d["plants"] if not p["error"]]
assert sorted(ids) == ["-7.13", "=2.385+A1", "glide-ok"], ids   # every model has its id as text
# a rejected row whose id was refused has none (null), never the raw bytes
assert [p["id"] for p in d["plants"] if p["error"]] == [None, None, "glide-short", "glide-tiny", "glide-note"]
PY
check "hostile rows: JSON is UTF-8, ids are strings, counts add up" 0 $?
"$ps" screen -o "$tmp/hr" --gate never "$hr" >"$tmp/out" 2>"$tmp/err"; check "hostile rows: screen exit 3" 3 $?
"$py" - "$tmp/hr/hostile-rows.screen/hostile-rows.screen.csv" <<'PY'
import csv, sys
rows = list(csv.DictReader(open(sys.argv[1], newline="", encoding="utf-8"), strict=True))
ids = {r["id"] for r in rows}
assert "'=2.385+A1" in ids and "'-7.13" in ids and "=2.385+A1" not in ids, ids
for r in rows:
    for k, v in r.items():
        assert not v or v[0] not in "=+-@\t\r", (k, v)   # no cell a spreadsheet would run
    if r["id"] == "'-7.13":
        assert float(r["rhp_poles"]) == 0 and r["verdict"] == "clear", r
PY
check "hostile rows: formula-like ids guarded in the CSV report, numbers left as numbers" 0 $?

# A YAML file whose structure breaks: the reports say after which line the
# entries were not read, and that their number is not known.
cut="$src/tests/data/e2e/cut-structure.yaml"
"$ps" screen -o "$tmp/cut" --gate never "$cut" >"$tmp/out" 2>"$tmp/err"; check "cut YAML: exit 4" 4 $?
contains "cut YAML: stderr names file:line:col" "$tmp/err" "$cut:16:9: did not find expected ',' or ']'"
unread="not read to the end: the entries after line 16 were not read; their number is not known"
contains "cut YAML: terminal says what was not read" "$tmp/out" "$unread"
contains "cut YAML: .txt says what was not read" "$tmp/cut/cut-structure.screen/cut-structure.screen.txt" "$unread"
contains "cut YAML: .md says what was not read" "$tmp/cut/cut-structure.screen/cut-structure.screen.md" "the entries after line 16 were not read"
contains "cut YAML: .html says what was not read" "$tmp/cut/cut-structure.screen/cut-structure.screen.html" "the entries after line 16 were not read"
"$py" - "$tmp/cut/cut-structure.screen/cut-structure.screen.json" "$src/reports/schema/plantsieve-screening.schema.json" "$src/reports/schema/plantsieve-survey.schema.json" <<'PY'
import json, sys
from screen_doc import load
d = load(sys.argv[1])
e = d["catalogs"][0]["error"]
assert d["catalogs"][0]["status"] == "failed" and e["line"] == 16 and e["unread_after_line"] == 16, e
assert e["unread"].startswith("the entries after line 16 were not read"), e
ids = sorted(p["id"] for p in d["plants"])
assert ids == ["cut-before-1", "cut-before-2", "cut-broken"], ids   # none after line 16
PY
check "cut YAML: JSON catalogs entry names the line after which nothing was read" 0 $?
"$ps" survey --json "$cut" >"$tmp/cut.json" 2>/dev/null
"$py" -c '
import json, sys, jsonschema
d = json.load(open(sys.argv[1]))
jsonschema.validate(d, json.load(open(sys.argv[2])))
assert d["catalogs"][0]["error"]["unread_after_line"] == 16, d["catalogs"]
' "$tmp/cut.json" "$src/reports/schema/plantsieve-survey.schema.json"; check "cut YAML: survey JSON names the line too" 0 $?

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
