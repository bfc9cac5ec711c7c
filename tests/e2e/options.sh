#!/bin/sh
# options.sh - the command line itself: --help of every command (exit 0, each
# option listed and each listed option known to the program), values as
# "--opt v" and "--opt=v", options after the catalogs, "--", and the usage
# errors (exit 2, our message, pointing to the command's --help).
# Usage: options.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$(cd "$2" && pwd)
. "$src/tests/e2e/lib.sh"
cd "$tmp" # a run that took an option for a catalog would write ./reports here, not into the tree
demo="$src/catalogs/demo-variants.yaml"
cf="$src/tests/data/e2e/closed-form.yaml"

# Every option each command has (README "Command line" and "Screening").
opts_survey="--json -h --help"
opts_screen="-o --gate --marginal-at --no-files --threads --quiet --show --detail --memory-rows --shard -h --help --certify --budget"
opts_merge="-o --gate --no-files --threads --show --memory-rows -h --help"
opts_explain="--certify --budget -h --help"
opts_certify="--budget --json --threads -h --help"
opts_read="-h --help"

"$ps" --help >"$tmp/out" 2>"$tmp/err"; check "plantsieve --help exits 0" 0 $?
for c in screen merge explain survey read certify; do
    grep -q "^  $c " "$tmp/out"; check "plantsieve --help lists the command $c" 0 $?
done
contains "plantsieve --help points to each command's help" "$tmp/out" "plantsieve COMMAND --help"

for c in survey screen merge explain read certify; do
    eval "opts=\$opts_$c"
    for h in --help -h; do
        "$ps" $c $h >"$tmp/help.$c" 2>"$tmp/err"; check "$c $h exits 0" 0 $?
        [ ! -s "$tmp/err" ]; check "$c $h writes nothing on stderr" 0 $?
    done
    contains "$c --help is its usage" "$tmp/help.$c" "usage: plantsieve $c "
    "$ps" help $c >"$tmp/out" 2>&1; check "help $c exits 0" 0 $?
    cmp -s "$tmp/out" "$tmp/help.$c"; check "help $c is $c --help" 0 $?
    for o in $opts; do
        # An option in the options list starts its line ("  -o DIR", "  -h, --help").
        grep -Eq -- "^  (-[a-z], )?$o([ ,]|\$)" "$tmp/help.$c"; check "$c --help lists $o" 0 $?
    done
    # Every option the help lists is one the program knows (the help says
    # nothing the code does not do): given alone, none is "unknown".
    for o in $(sed -n 's/^  \(-[a-z]\)\(, \(--[a-z-]*\)\)\{0,1\}.*/\1 \3/p; s/^  \(--[a-z-]*\).*/\1/p' "$tmp/help.$c"); do
        "$ps" $c "$o" >"$tmp/out" 2>"$tmp/err"
        ! grep -q "unknown option" "$tmp/err"; check "$c knows $o, which its help lists" 0 $?
    done
    n_listed=$(sed -n 's/^  \(-[a-z]\)\(, \(--[a-z-]*\)\)\{0,1\}.*/\1 \3/p; s/^  \(--[a-z-]*\).*/\1/p' "$tmp/help.$c" | wc -w)
    n_known=$(echo $opts | wc -w)
    [ "$n_listed" = "$n_known" ]; check "$c --help lists $n_known options (lists $n_listed)" 0 $?

    # An unknown option: exit 2, our words, the command's help named, nothing on stdout.
    "$ps" $c --bogus "$cf" >"$tmp/out" 2>"$tmp/err"; check "$c --bogus exits 2" 2 $?
    contains "$c --bogus: our message" "$tmp/err" "plantsieve: unknown option: --bogus"
    contains "$c --bogus: points to the command's help" "$tmp/err" "Try 'plantsieve $c --help'."
    [ ! -s "$tmp/out" ]; check "$c --bogus prints nothing on stdout" 0 $?
    ! grep -q "unrecognized\|invalid option" "$tmp/err"; check "$c --bogus: no message of getopt's own" 0 $?
    "$ps" $c -Z "$cf" >"$tmp/out" 2>"$tmp/err"; check "$c -Z exits 2" 2 $?
    contains "$c -Z: our message" "$tmp/err" "plantsieve: unknown option: -Z"
    "$ps" $c -hZ >"$tmp/out" 2>"$tmp/err"; check "$c -hZ: options in order, the help first" 0 $?
    "$ps" $c -- --help -Zh "$cf" >"$tmp/out" 2>"$tmp/err"
    ! grep -q "usage:\|unknown option" "$tmp/out" "$tmp/err"; check "$c -- --help -Zh CAT: operands only" 0 $?
    "$ps" $c --hel "$cf" >"$tmp/out" 2>"$tmp/err"; check "$c --hel (an abbreviation) exits 2" 2 $?
    contains "$c --hel: not taken for --help" "$tmp/err" "plantsieve: unknown option: --hel"
    "$ps" $c --help=yes >"$tmp/out" 2>"$tmp/err"; check "$c --help=yes exits 2" 2 $?
    contains "$c --help=yes: takes no value" "$tmp/err" "plantsieve: option takes no value: --help=yes"
done

# A letter inside a cluster after a long option is named itself (getopt has
# not moved past the cluster then), not the option before it.
"$ps" screen --quiet -Zq "$cf" >"$tmp/out" 2>"$tmp/err"; check "screen --quiet -Zq exits 2" 2 $?
contains "screen --quiet -Zq: -Z named" "$tmp/err" "plantsieve: unknown option: -Z"
"$ps" survey --json -Zq "$cf" >"$tmp/out" 2>"$tmp/err"; check "survey --json -Zq exits 2" 2 $?
contains "survey --json -Zq: -Z named" "$tmp/err" "plantsieve: unknown option: -Z"

# Values as "--opt v" and "--opt=v", options before or after the catalogs: the same run.
"$ps" screen --no-files --gate never --marginal-at 0.5 --show 3 --threads 2 --detail flagged "$demo" \
    >"$tmp/sep" 2>"$tmp/err"; check "screen, values as separate words" 0 $?
"$ps" screen --no-files --gate=never --marginal-at=0.5 --show=3 --threads=2 --detail=flagged "$demo" \
    >"$tmp/eq" 2>"$tmp/err"; check "screen, values after '='" 0 $?
"$ps" screen "$demo" --no-files --gate never --marginal-at=0.5 --show 3 --threads=2 --detail flagged \
    >"$tmp/after" 2>"$tmp/err"; check "screen, options after the catalog" 0 $?
# The listing quotes its own command line ("command: plantsieve screen ..."), which differs
# by construction; every other line must be the same.
same_run "$tmp/sep" "$tmp/eq"; check "screen: --opt=v is --opt v" 0 $?
same_run "$tmp/sep" "$tmp/after"; check "screen: options after the catalog act as before it" 0 $?
contains "--marginal-at=0.5 is applied" "$tmp/eq" "marginal from 0.5"
contains "--show=3 is applied" "$tmp/eq" "--show all prints them"
[ "$(grep -c '^ *[0-9][0-9]*  ' "$tmp/eq")" = 3 ]; check "--show=3 prints 3 ranked rows" 0 $?
"$ps" screen --no-files "$demo" >/dev/null 2>&1; check "screen, default gate trips on the demo" 1 $?
"$ps" screen "$demo" --no-files --gate=never >/dev/null 2>&1; check "screen CAT --gate=never passes" 0 $?
# Without --no-files the set goes into -o DIR; -oDIR and -o DIR alike; nothing into ./reports.
mkdir "$tmp/cwd"
(cd "$tmp/cwd" && "$ps" screen "$cf" --gate never -o "$tmp/o1" --quiet >/dev/null 2>&1); check "screen CAT -o DIR" 0 $?
(cd "$tmp/cwd" && "$ps" screen "$cf" --gate never "-o$tmp/o2" >/dev/null 2>&1); check "screen CAT -oDIR" 0 $?
[ -s "$tmp/o1/closed-form.screen/closed-form.screen.json" ]; check "-o DIR after the catalog: set written there" 0 $?
[ -s "$tmp/o2/closed-form.screen/closed-form.screen.json" ]; check "-oDIR: set written there" 0 $?
[ ! -e "$tmp/cwd/reports" ]; check "-o after the catalog: nothing written into ./reports" 0 $?
(cd "$tmp/cwd" && "$ps" screen "$cf" --no-files --gate never >/dev/null 2>&1); check "screen CAT --no-files" 0 $?
[ ! -e "$tmp/cwd/reports" ]; check "--no-files after the catalog: no report written" 0 $?

"$ps" survey "$demo" --json >"$tmp/out" 2>"$tmp/err"; check "survey CAT --json" 0 $?
"$py" -c 'import json, sys; json.load(open(sys.argv[1]))' "$tmp/out"; check "survey CAT --json writes JSON" 0 $?
"$ps" explain strider-d "$demo" >"$tmp/e1" 2>&1; check "explain ID CAT" 0 $?
"$ps" explain -- strider-d "$demo" >"$tmp/e2" 2>&1; check "explain -- ID CAT" 0 $?
cmp -s "$tmp/e1" "$tmp/e2"; check "explain: '--' before the id changes nothing" 0 $?

# "--" ends the options: what follows is a catalog name, even "--json".
"$ps" survey -- --json >"$tmp/out" 2>"$tmp/err"; check "survey -- --json: a catalog named --json" 4 $?
contains "survey -- --json: the file named" "$tmp/err" "plantsieve: --json:"
"$ps" read "$cf" -- --help >"$tmp/out" 2>"$tmp/err"; check "read CAT -- --help: no help, two catalogs" 4 $?
contains "read CAT -- --help: first catalog read" "$tmp/out" "closed-form.yaml: "
! grep -q "usage:" "$tmp/out"; check "read CAT -- --help prints no help" 0 $?

# Values that are missing or wrong: exit 2 and what was expected.
"$ps" screen "$cf" --gate >"$tmp/out" 2>"$tmp/err"; check "screen CAT --gate (no value)" 2 $?
contains "missing value named" "$tmp/err" "plantsieve: option needs a value: --gate"
"$ps" screen "$cf" -o >"$tmp/out" 2>"$tmp/err"; check "screen CAT -o (no value)" 2 $?
contains "missing -o value named" "$tmp/err" "plantsieve: option needs a value: -o"
"$ps" screen --threads=65 "$cf" >"$tmp/out" 2>"$tmp/err"; check "--threads=65" 2 $?
contains "--threads=65 named" "$tmp/err" "--threads takes a whole number from 1 to 64: 65"
"$ps" screen --memory-rows=2x "$cf" >"$tmp/out" 2>"$tmp/err"; check "--memory-rows=2x" 2 $?
"$ps" screen --marginal-at=1.5 "$cf" >"$tmp/out" 2>"$tmp/err"; check "--marginal-at=1.5" 2 $?
contains "--marginal-at=1.5 named" "$tmp/err" "--marginal-at takes a number in (0, 1]: 1.5"
"$ps" screen --show=all --no-files --gate never "$cf" >"$tmp/out" 2>"$tmp/err"; check "--show=all" 0 $?
"$ps" read >"$tmp/out" 2>"$tmp/err"; check "read without catalogs" 2 $?
contains "read without catalogs: said" "$tmp/err" "read needs at least one catalog file"
"$ps" explain strider-d >"$tmp/out" 2>"$tmp/err"; check "explain without catalogs" 2 $?
"$ps" certify >"$tmp/out" 2>"$tmp/err"; check "certify without catalogs" 2 $?
contains "certify without catalogs: said" "$tmp/err" "certify needs at least one catalog file"
"$ps" certify --budget=99 "$cf" >"$tmp/out" 2>"$tmp/err"; check "certify --budget=99" 2 $?
contains "certify --budget=99 named" "$tmp/err" "--budget needs a whole number from 100 to 10000000: 99"
"$ps" explain --certify --budget=300 strider-a "$demo" >"$tmp/out" 2>"$tmp/err"; check "explain --certify" 0 $?
contains "explain --certify: section 8" "$tmp/out" "8. The other side of the bracket"
contains "explain --certify: the search's count" "$tmp/out" "loop evaluations, seed"
"$ps" explain strider-a "$demo" >"$tmp/out" 2>"$tmp/err"
! grep -q "8. The other side" "$tmp/out"; check "explain without --certify has no section 8" 0 $?
"$ps" help frobnicate >"$tmp/out" 2>"$tmp/err"; check "help of an unknown command" 2 $?
"$ps" --frobnicate >"$tmp/out" 2>"$tmp/err"; check "an unknown option of the program" 2 $?
contains "an unknown option of the program: named" "$tmp/err" "plantsieve: unknown option: --frobnicate"
contains "an unknown option of the program: the program's help" "$tmp/err" "Try 'plantsieve --help'."
"$ps" frobnicate >"$tmp/out" 2>"$tmp/err"; check "an unknown command" 2 $?
contains "an unknown command: named" "$tmp/err" "plantsieve: unknown command: frobnicate"

echo "options: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
