#!/bin/sh
# html_chromium.sh - the HTML screening report as a browser sees it: headless
# Chromium renders it to PNG and PDF and dumps the DOM, whose plant rows must
# match the CSV report one for one; with the JSON report beside the CSV, the
# family section holds one boundary figure per evaluated boundary and one
# yield bar per yield study.
# Usage: html_chromium.sh PLANTSIEVE CATALOG   (runs plantsieve screen)
#        html_chromium.sh --report HTML CSV    (checks an existing pair)
# Exit 0 pass, 1 fail, 77 skipped (no Chromium, or no Debian python3).
set -u

browser=""
for b in chromium chromium-browser; do
    if command -v "$b" >/dev/null 2>&1; then browser=$(command -v "$b"); break; fi
done
if [ -z "$browser" ]; then
    echo "SKIPPED: chromium not installed"
    exit 77
fi
py=$(command -p -v python3 2>/dev/null || true)
if [ -z "$py" ]; then
    echo "SKIPPED: Debian python3 not found on the default PATH"
    exit 77
fi

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
ok() { echo "ok: $1"; }
bad() { echo "FAIL: $1"; fail=1; }

if [ "${1:-}" = "--report" ]; then
    [ $# -eq 3 ] || { echo "usage: $0 --report HTML CSV" >&2; exit 2; }
    html=$2
    csv=$3
else
    [ $# -eq 2 ] || { echo "usage: $0 PLANTSIEVE CATALOG" >&2; exit 2; }
    ps=$1
    catalog=$2
    stem=$(basename "$catalog")
    stem=${stem%.*}
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
render() { # render WHAT OUTPUT_FLAG... ; stdout to $tmp/chromium.out
    what=$1
    shift
    HOME=$tmp timeout 120 "$browser" --headless $sandbox --disable-gpu --disable-dev-shm-usage \
        --no-first-run --disable-extensions --disable-background-networking --hide-scrollbars \
        --user-data-dir="$tmp/profile" "$@" "$url" >"$tmp/chromium.out" 2>"$tmp/chromium.err"
    rc=$?
    if [ $rc -eq 0 ]; then
        ok "$what"
    else
        bad "$what: chromium exited $rc"
        # Headless Chromium without a session bus logs D-Bus noise; leave it out.
        grep -v dbus "$tmp/chromium.err" | tail -20 | sed 's/^/    /'
    fi
}

render "screenshot" --window-size=1280,2400 --screenshot="$tmp/report.png"
render "print to PDF" --no-pdf-header-footer --print-to-pdf="$tmp/report.pdf"
render "dump DOM" --dump-dom
cp "$tmp/chromium.out" "$tmp/dom.html"

json=${csv%.csv}.json
"$py" - "$tmp/report.png" "$tmp/report.pdf" "$tmp/dom.html" "$csv" "$json" <<'PY'
import csv, json, os, re, struct, sys
from html.parser import HTMLParser

png, pdf, dom, csv_path, json_path = sys.argv[1:6]
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
check(len(parser.ids) == len(body), "DOM plant rows %d == CSV plants %d" % (len(parser.ids), len(body)))
check(parser.ids == ids, "DOM plant rows in CSV rank order")
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
[ $fail -eq 0 ] || exit 1
echo "PASS: html_chromium"
exit 0
