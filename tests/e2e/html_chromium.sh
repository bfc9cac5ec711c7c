#!/bin/sh
# html_chromium.sh - the HTML screening report as a browser sees it: headless
# Chromium renders it to PNG and PDF and dumps the DOM, whose plant rows must
# match the CSV report one for one; with the JSON report beside the CSV, the
# family section holds one boundary figure per evaluated boundary and one
# yield bar per yield study. Screenshots at 1280 and 390 px wide are kept in
# OUTDIR (default ./html_chromium.out; paths printed). At 390 px the page is
# measured in the browser (narrow_view.py): no horizontal overflow of the page
# or the ranking. Every in-page link resolves; the
# printed PDF (pdftotext) holds every plant id of the ranking. With
# PLANTSIEVE, a generated catalog larger than the ranking cap shows the cap.
# Usage: html_chromium.sh PLANTSIEVE CATALOG [SOURCE_DIR]   (runs plantsieve screen)
#        html_chromium.sh --report HTML CSV                  (checks an existing pair)
# Exit 0 pass, 1 fail, 77 skipped (no Chromium, pdftotext or Debian python3).
set -u

browser=""
for b in chromium chromium-browser; do
    if command -v "$b" >/dev/null 2>&1; then browser=$(command -v "$b"); break; fi
done
if [ -z "$browser" ]; then
    echo "SKIPPED: chromium not installed"
    exit 77
fi
if ! command -v pdftotext >/dev/null 2>&1; then
    echo "SKIPPED: pdftotext (poppler-utils) not installed"
    exit 77
fi
py=$(command -p -v python3 2>/dev/null || true)
if [ -z "$py" ]; then
    echo "SKIPPED: Debian python3 not found on the default PATH"
    exit 77
fi

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
outdir=${OUTDIR:-$(pwd)/html_chromium.out}
mkdir -p "$outdir" || exit 1
fail=0
ok() { echo "ok: $1"; }
bad() { echo "FAIL: $1"; fail=1; }

if [ "${1:-}" = "--report" ]; then
    [ $# -eq 3 ] || { echo "usage: $0 --report HTML CSV" >&2; exit 2; }
    html=$2
    csv=$3
else
    [ $# -eq 2 ] || [ $# -eq 3 ] || { echo "usage: $0 PLANTSIEVE CATALOG [SOURCE_DIR]" >&2; exit 2; }
    ps=$1
    catalog=$2
    src=${3:-}
    stem=$(basename "$catalog")
    stem=${stem%.*}
    # The catalog is read from a deep directory, so that the page shows a file
    # path longer than a phone's width wherever it names one (the path must
    # fold there, not widen the page), whatever the checkout's own path.
    deep=$tmp/a-directory-with-a-long-name-of-its-own/and-another-one-below-it/and-a-third-level-here
    mkdir -p "$deep" && cp "$catalog" "$deep/" || { echo "FAIL: copy the catalog"; exit 1; }
    catalog=$deep/$(basename "$catalog")
    "$ps" screen -o "$tmp/out" --gate never "$catalog" >"$tmp/stdout" 2>"$tmp/stderr"
    rc=$?
    if [ $rc -ne 0 ]; then
        echo "FAIL: plantsieve screen exited $rc"
        sed 's/^/    /' "$tmp/stderr"
        exit 1
    fi
    ok "plantsieve screen -o DIR --gate never $(basename "$catalog") exits 0"
    html=$tmp/out/$stem.screen/$stem.screen.html
    csv=$tmp/out/$stem.screen/$stem.screen.csv
fi
for f in "$html" "$csv"; do
    if [ ! -s "$f" ]; then echo "FAIL: no report $f"; exit 1; fi
done
case $html in
    /*) url="file://$html" ;;
    *) url="file://$(pwd)/$html" ;;
esac

# Root needs --no-sandbox; the profile lives in the temporary directory so
# nothing is read from or left in the user's home.
sandbox=""
[ "$(id -u)" -eq 0 ] && sandbox="--no-sandbox"
render() { # render WHAT OUTPUT_FLAG... ; stdout to $tmp/chromium.out; the page is $page (default $url)
    what=$1
    shift
    HOME=$tmp timeout 120 "$browser" --headless $sandbox --disable-gpu --disable-dev-shm-usage \
        --no-first-run --disable-extensions --disable-background-networking --hide-scrollbars \
        --user-data-dir="$tmp/profile" "$@" "${page:-$url}" >"$tmp/chromium.out" 2>"$tmp/chromium.err"
    rc=$?
    if [ $rc -eq 0 ]; then
        ok "$what"
    else
        bad "$what: chromium exited $rc"
        # Headless Chromium without a session bus logs D-Bus noise; leave it out.
        grep -v dbus "$tmp/chromium.err" | tail -20 | sed 's/^/    /'
    fi
}

render "screenshot 1280 px wide" --window-size=1280,2400 --screenshot="$outdir/report-1280.png"
# Headless Chromium makes no window narrower than 500 px: the 390 px view is
# set through the DevTools protocol (narrow_view.py), which also measures it.
HOME=$tmp timeout 120 "$py" "$(dirname "$0")/narrow_view.py" "$browser" "$url" 390 2400 "$outdir/report-390.png" \
    "$tmp/profile390" >"$tmp/measure390.txt" 2>"$tmp/narrow.err"
if [ $? -eq 0 ]; then ok "view and screenshot 390 px wide"; else bad "view 390 px wide"; tail -5 "$tmp/narrow.err"; fi
echo "screenshots: $outdir/report-1280.png $outdir/report-390.png"
cp "$outdir/report-1280.png" "$tmp/report.png"
render "print to PDF" --no-pdf-header-footer --print-to-pdf="$outdir/report.pdf"
echo "PDF: $outdir/report.pdf"
cp "$outdir/report.pdf" "$tmp/report.pdf"
pdftotext -enc UTF-8 "$tmp/report.pdf" "$tmp/report.txt" || bad "pdftotext reads the PDF"
# The ranking as printed, alone: the same page with every other part of the
# body left out of print, so that the ids found come from the printed table.
sed 's|</head>|<style>@media print{body>*:not(#ranking){display:none}}</style></head>|' "$html" >"$tmp/ranking-only.html"
page="file://$tmp/ranking-only.html" render "print the ranking alone to PDF" --no-pdf-header-footer \
    --print-to-pdf="$tmp/ranking.pdf"
pdftotext -enc UTF-8 "$tmp/ranking.pdf" "$tmp/ranking.txt" || bad "pdftotext reads the ranking's PDF"
render "dump DOM" --dump-dom
cp "$tmp/chromium.out" "$tmp/dom.html"


json=${csv%.csv}.json
"$py" - "$tmp/report.png" "$tmp/report.pdf" "$tmp/dom.html" "$csv" "$json" "$tmp/ranking.txt" "$tmp/measure390.txt" <<'PY'
import csv, json, os, re, struct, sys
from html.parser import HTMLParser

png, pdf, dom, csv_path, json_path, pdf_text, measured = sys.argv[1:8]
failed = False
def check(cond, what):
    global failed
    print(("ok: " if cond else "FAIL: ") + what)
    failed |= not cond

def head(path, n):
    try:
        with open(path, "rb") as f:
            return f.read(n)
    except OSError:
        return b""

# PNG: signature, an IHDR of the window size, and more than a blank page's bytes.
p = head(png, 33)
check(p[:8] == b"\x89PNG\r\n\x1a\n", "PNG signature")
if len(p) >= 24 and p[12:16] == b"IHDR":
    w, h = struct.unpack(">II", p[16:24])
    check(w >= 800 and h >= 800, "PNG size %dx%d" % (w, h))
else:
    check(False, "PNG header")
check(os.path.exists(png) and os.path.getsize(png) > 30000, "PNG is not trivial (%d bytes)" % (os.path.getsize(png) if os.path.exists(png) else 0))

# PDF: header, trailer, at least one page, non-trivial size.
data = open(pdf, "rb").read() if os.path.exists(pdf) else b""
check(data[:5] == b"%PDF-", "PDF header")
check(b"%%EOF" in data[-1024:], "PDF trailer")
pages = len(re.findall(rb"/Type\s*/Page(?!s)", data))
check(pages >= 1, "PDF pages: %d" % pages)
check(len(data) > 20000, "PDF is not trivial (%d bytes)" % len(data))

# DOM as the browser built it: plant rows, ids, caution, figures.
class Rows(HTMLParser):
    def __init__(self):
        super().__init__()
        self.ids, self.svgs, self.caution, self.scripts = [], 0, False, 0
        self.families, self.bound_svgs, self.yield_svgs, self.figure = False, [], [], None
        self.anchors, self.links = [], []
    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        classes = (a.get("class") or "").split()
        if tag == "section" and a.get("id") == "families":
            self.families = True
        if tag == "figure" and "family-boundary" in classes:
            self.figure = (a.get("data-family"), a.get("data-parameter"))
        if tag == "svg" and "family-boundary" in classes:
            self.bound_svgs.append(self.figure)
        if tag == "svg" and "family-yield" in classes:
            self.yield_svgs.append(a.get("aria-label"))
        if tag == "tr" and "plant-row" in classes:
            self.ids.append(a.get("data-id"))
        if a.get("id") is not None:
            self.anchors.append(a["id"])
        if tag == "a" and (a.get("href") or "").startswith("#"):
            self.links.append(a["href"][1:])
        if tag == "svg":
            self.svgs += 1
        if tag == "script":
            self.scripts += 1
        if tag == "section" and a.get("id") == "caution":
            self.caution = True
parser = Rows()
parser.feed(open(dom, encoding="utf-8").read())
with open(csv_path, newline="", encoding="utf-8") as f:
    rows = list(csv.reader(f, strict=True))
header, body = rows[0], rows[1:]
ids = [r[header.index("id")] for r in body]
check(len(body) > 0, "CSV has plants (%d)" % len(body))
# The ranking cap (PS_HTML_RANK_ROWS in src/report/html_page.h): the first
# 500 plants of the CSV, and a sentence saying so when the run is larger.
CAP = 500
want = ids[:CAP]
check(len(parser.ids) == len(want), "DOM plant rows %d == CSV plants %d (cap %d)" % (len(parser.ids), len(body), CAP))
check(parser.ids == want, "DOM plant rows in CSV rank order")
text = open(dom, encoding="utf-8").read()
if len(body) > CAP:
    check("Showing %d of %d plants." % (CAP, len(body)) in text, "the page says it shows %d of %d plants" % (CAP, len(body)))
# In-page links: every href="#x" names an element id; ids are unique.
dup = sorted(set(x for x in parser.anchors if parser.anchors.count(x) > 1)) if len(parser.anchors) < 5000 else []
check(not dup, "element ids unique (%d ids)%s" % (len(parser.anchors), " repeated: %s" % dup[:5] if dup else ""))
known = set(parser.anchors)
missing = [l for l in parser.links if l not in known]
check(parser.links and not missing, "%d in-page links resolve%s" % (len(parser.links), " (missing: %s)" % missing[:5] if missing else ""))
# At 390 px: the page does not scroll sideways and the ranking ends inside the viewport.
m = re.fullmatch(r"(viewport=\d+ scroll=\d+ body=\d+ table=-?\d+ cells=\d+) widest=(.*)\n?", open(measured, encoding="utf-8").read())
check(m is not None, "measurement at 390 px made by the browser")
if m:
    v = {k: int(x) for k, x in (p.split("=") for p in m.group(1).split())}
    print("measured at 390 px: %s" % m.group(1))
    check(v["viewport"] == 390, "viewport 390 px wide (%d)" % v["viewport"])
    check(v["scroll"] <= v["viewport"] and v["body"] <= v["viewport"], "no horizontal scroll at 390 px (page %d, body %d%s)" % (v["scroll"], v["body"], "" if v["scroll"] <= v["viewport"] or m.group(2) == "none" else "; past the edge: " + m.group(2)))
    check(0 < v["table"] <= v["viewport"] and v["cells"] <= v["viewport"], "ranking inside 390 px (table right edge %d, cells %d)" % (v["table"], v["cells"]))
# The printed ranking: every plant id of its rows is in the PDF's text, whole.
printed = open(pdf_text, encoding="utf-8", errors="replace").read()
lost = [i for i in want if i not in printed]
check(not lost, "printed ranking (PDF text) holds all %d ranking ids%s" % (len(want), " (missing: %s)" % lost[:5] if lost else ""))
check(parser.caution, "caution section present")
check(parser.svgs >= 1, "figures present (%d svg)" % parser.svgs)
check(parser.scripts == 0, "no script")

# Families (when the JSON report is at hand): one svg.family-boundary per
# boundary that could be evaluated, in catalog order, one svg.family-yield per yield.
if os.path.exists(json_path):
    fams = json.load(open(json_path, encoding="utf-8")).get("families") or []
    want = [(f["id"], b["parameter"]) for f in fams for b in f["boundaries"] if b["state"] != "evaluation-error"]
    yields = sum(1 for f in fams if f.get("yield"))
    check(parser.families == bool(fams), "families section %s" % ("present" if fams else "absent"))
    check(parser.bound_svgs == want, "DOM boundary figures %s == JSON boundaries %s" % (parser.bound_svgs, want))
    check(len(parser.yield_svgs) == yields, "DOM yield bars %d == JSON yield studies %d" % (len(parser.yield_svgs), yields))
sys.exit(1 if failed else 0)
PY
[ $? -eq 0 ] || fail=1

# A run larger than the ranking cap: 620 generated plants (tests/bench/gen_catalog.py),
# the same checks on its report (screenshots in OUTDIR/large).
if [ -n "${ps:-}" ] && [ -n "${src:-}" ]; then
    # Ten of its plants get ids of 90 characters (the longest allowed is 96),
    # wider than a phone's screen: they must fold on the narrow view.
    long=with-an-identifier-far-longer-than-a-narrow-screen-is-wide-0123456789-abcdefghijklmnopq
    if "$py" "$src/tests/bench/gen_catalog.py" 620 "$tmp/large.yaml" --seed 2385 >/dev/null &&
        sed -i "s/^  - id: b\([0-9]\)\$/  - id: b\1-$long/" "$tmp/large.yaml" &&
        [ "$(grep -c -- "-$long\$" "$tmp/large.yaml")" -eq 10 ] &&
        "$ps" screen -o "$tmp/large" --gate never --quiet --detail none "$tmp/large.yaml" >/dev/null 2>&1; then
        ok "plantsieve screen of 620 generated plants (10 with 90-character ids)"
        echo "--- 620 plants (more than the ranking cap) ---"
        OUTDIR="$outdir/large" sh "$0" --report "$tmp/large/large.screen/large.screen.html" "$tmp/large/large.screen/large.screen.csv"
        [ $? -eq 0 ] || bad "checks of the 620-plant report"
        hb=$(wc -c <"$tmp/large/large.screen/large.screen.html")
        echo "HTML of 620 plants: $hb bytes"
    else
        bad "plantsieve screen of 620 generated plants"
    fi
fi
[ $fail -eq 0 ] || exit 1
echo "PASS: html_chromium"
exit 0
