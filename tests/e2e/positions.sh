#!/bin/sh
# positions.sh - every diagnostic and text report names a position only where
# one is known: "FILE: message" for a catalog that cannot be opened (no line),
# "FILE:LINE:" for an entry whose column is not known, "FILE:LINE:COL:" when
# both are; never a made-up ":0:0". Usage: positions.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$(cd "$2" && pwd)
. "$src/tests/e2e/lib.sh"
cd "$tmp"
miss="$tmp/missing.yaml"
cf="$src/tests/data/e2e/closed-form.yaml"
ztf="$src/tests/data/e2e/zero-tf.yaml"
cut="$src/tests/data/e2e/cut-structure.yaml"

lacks() { # lacks NAME FILE REGEX
    if grep -Eq -- "$3" "$2"; then fail=$((fail + 1)); echo "FAIL: $1: /$3/ in $2:"; grep -En -- "$3" "$2" | sed 's/^/    /'; else pass=$((pass + 1)); fi
}

# A catalog that cannot be opened: no line, so no position at all.
for c in survey read "screen --no-files" "explain some-id"; do
    "$ps" $c "$miss" >"$tmp/out" 2>"$tmp/err"; check "$c of a missing catalog exits 4" 4 $?
    contains "$c: file named without a position" "$tmp/err" "plantsieve: $miss: cannot open: "
    lacks "$c: no ':0' position" "$tmp/err" "$miss:0"
done
"$ps" screen -o "$tmp/m" --gate never "$miss" "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen, a missing and a good catalog" 4 $?
set_dir="$tmp/m/missing.screen"
for ext in txt md html junit.xml; do
    [ -s "$set_dir/missing.screen.$ext" ]; check "report $ext written" 0 $?
    lacks "$ext report: no line 0" "$set_dir/missing.screen.$ext" "line 0|:0:0|missing.yaml:0"
done
contains "md report: the reason, without a position" "$set_dir/missing.screen.md" "**not read to the end** (cannot open: "
lacks "stdout: no :0" "$tmp/out" "missing.yaml:0"

# An entry rejected at a line, no column known: "FILE:LINE:", never ":LINE:0".
"$ps" survey "$ztf" >"$tmp/out" 2>"$tmp/err"; check "survey of an identically zero plant" 3 $?
contains "stderr: FILE:LINE: and the plant" "$tmp/err" "plantsieve: $ztf:5: plant 'blind-rig': every Markov parameter is zero"
lacks "stderr: no column 0" "$tmp/err" ":5:0"
contains "survey text: FILE:LINE" "$tmp/out" "blind-rig  REJECTED  $ztf:5"
"$ps" screen -o "$tmp/z" --gate never "$ztf" >"$tmp/out" 2>"$tmp/err"; check "screen of an identically zero plant" 3 $?
contains "screen stderr: FILE:LINE:" "$tmp/err" "plantsieve: $ztf:5: plant 'blind-rig': "
contains "txt report: FILE:LINE:" "$tmp/z/zero-tf.screen/zero-tf.screen.txt" "$ztf:5: blind-rig: "
contains "md report: FILE:LINE" "$tmp/z/zero-tf.screen/zero-tf.screen.md" "blind-rig ($ztf:5, field c)"
# The page may fold a path after each '/' (<wbr>, no text): read it without them.
sed 's/<wbr>//g' "$tmp/z/zero-tf.screen/zero-tf.screen.html" >"$tmp/z/page.html"
contains "html report: FILE:LINE" "$tmp/z/page.html" "$ztf:5</code>, field"
for f in "$tmp/err" "$tmp/out" "$tmp/z/zero-tf.screen/zero-tf.screen.txt" "$tmp/z/zero-tf.screen/zero-tf.screen.md" \
         "$tmp/z/zero-tf.screen/zero-tf.screen.html"; do
    lacks "no column 0 in $(basename "$f")" "$f" "zero-tf.yaml:5:0"
done
"$ps" explain blind-rig "$ztf" >"$tmp/out" 2>"$tmp/err"; check "explain of the rejected plant" 3 $?
contains "explain: line, no column" "$tmp/out" "input error at line 5, field 'c': "

# Both known: the full position stays.
"$ps" survey "$cut" >"$tmp/out" 2>"$tmp/err"; check "survey of a cut catalog" 4 $?
grep -Eq "^plantsieve: $cut:[1-9][0-9]*:[1-9][0-9]*: " "$tmp/err"; check "cut catalog: FILE:LINE:COL:" 0 $?
"$ps" screen -o "$tmp/c" --gate never "$cut" >"$tmp/out" 2>"$tmp/err"; check "screen of a cut catalog" 4 $?
grep -Eq "\*\*not read to the end\*\* \(line [1-9][0-9]*, column [1-9][0-9]*: " "$tmp/c/cut-structure.screen/cut-structure.screen.md"
check "md report of a cut catalog: line and column" 0 $?

echo "positions: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
