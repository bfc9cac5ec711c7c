# lib.sh - what every end-to-end script shares (sourced after ps and src are
# set): Debian's python3, a temporary directory removed on exit, and the
# pass/fail counters with their two checks.
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
same_run() { # same_run A B: the same report or listing of two runs whose command lines differ
    # (other -o, --threads, --memory-rows, ...): equal byte for byte once the lines quoting the
    # command line (they hold "plantsieve screen") are left out of both.
    grep -v "plantsieve screen" "$1" >"$tmp/same_run.a"
    grep -v "plantsieve screen" "$2" >"$tmp/same_run.b"
    cmp -s "$tmp/same_run.a" "$tmp/same_run.b"
}
# The HTML report's first page names the command line, which names the
# output directory: two runs into different directories differ there only.
# unlike_cmdline FILE: the file with the command line left out.
unlike_cmdline() { sed 's|<code class="cmd">[^<]*</code>|<code class="cmd"></code>|' "$1"; }
same_report() { # same_report A B: exit 0 when the reports are the same (HTML: but for the command line)
    case $1 in
        *.html) unlike_cmdline "$1" >"$tmp/same.a" && unlike_cmdline "$2" >"$tmp/same.b" && cmp -s "$tmp/same.a" "$tmp/same.b" ;;
        *) cmp -s "$1" "$2" ;;
    esac
}
