#!/bin/sh
# man_page.sh - docs/plantsieve.1 formats with groff (groff-base) without a
# warning, has a section for every command `plantsieve --help` lists, and
# each section names every option that the command's --help lists and no
# long option the command does not have. Usage: man_page.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$(cd "$2" && pwd)
. "$src/tests/e2e/lib.sh"
man="$src/docs/plantsieve.1"

if ! command -v groff >/dev/null 2>&1; then
    echo "FAIL: groff is not installed (Debian package groff-base)"
    exit 1
fi
groff -man -Tutf8 -ww -z "$man" >"$tmp/warn" 2>&1; check "groff -man -ww formats the page" 0 $?
[ ! -s "$tmp/warn" ]; check "groff prints no warning" 0 $?
[ -s "$tmp/warn" ] && sed 's/^/    /' "$tmp/warn"
groff -man -Tascii -P-cbou "$man" 2>/dev/null | grep -q "^CAUTION"; check "the page renders, with its caution" 0 $?
for s in NAME SYNOPSIS DESCRIPTION COMMANDS "EXIT STATUS" FILES ENVIRONMENT CAUTION "SEE ALSO"; do
    grep -q "^\.SH \"*$s\"*\$" "$man"; check "section $s" 0 $?
done

# The options an option list of a --help names: "  -o DIR", "  -h, --help", "  --gate WHEN".
help_options() {
    sed -n 's/^  \(-[a-z]\)\(, \(--[a-z-]*\)\)\{0,1\}.*/\1 \3/p; s/^  \(--[a-z-]*\).*/\1/p' "$1"
}
# The text of one subsection of the page (.SS NAME up to the next heading),
# with roff's escapes for a minus and for fonts taken out.
section() {
    awk -v name="$1" '/^\.S[SH] / { on = ($0 == ".SS " name) ; next } on' "$man" | sed 's/\\-/-/g; s/\\f[BIRP]//g; s/\\%//g'
}

"$ps" --help >"$tmp/help" 2>&1; check "plantsieve --help" 0 $?
cmds=$(sed -n '/^commands:/,/^$/p' "$tmp/help" | sed -n 's/^  \([a-z][a-z-]*\) .*/\1/p')
[ -n "$cmds" ]; check "commands found in plantsieve --help" 0 $?
for c in $cmds; do
    section "$c" >"$tmp/sec.$c"
    [ -s "$tmp/sec.$c" ]; check "the page has a section '.SS $c'" 0 $?
    "$ps" $c --help >"$tmp/help.$c" 2>&1; check "$c --help" 0 $?
    for o in $(help_options "$tmp/help.$c"); do
        grep -Eq -- "(^|[^a-z-])$o([^a-z-]|\$)" "$tmp/sec.$c"; check "section $c of the page names $o" 0 $?
    done
    for o in $(grep -Eo -- '--[a-z][a-z-]*' "$tmp/sec.$c" | sort -u); do
        help_options "$tmp/help.$c" | tr ' ' '\n' | grep -qx -- "$o"; check "$c has the option $o its section of the page names" 0 $?
    done
done
section "Without a command" >"$tmp/sec.top"
for o in $(sed -n '/^options:/,/^$/p' "$tmp/help" | help_options /dev/stdin); do
    grep -Eq -- "(^|[^a-z-])$o([^a-z-]|\$)" "$tmp/sec.top"; check "the page names the program's option $o" 0 $?
done

echo "man page: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
