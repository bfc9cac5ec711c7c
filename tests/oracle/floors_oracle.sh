#!/bin/sh
# floors_oracle.sh - the floors of `plantsieve survey --json` on the oracle
# catalog (tests/data/oracle/oracle-plants.yaml) against an independent
# numpy/scipy recomputation from the published formulas (floors_oracle.py).
# Usage: floors_oracle.sh PLANTSIEVE SOURCE_DIR
# Exit 0 pass, 1 mismatch or tool failure, 77 skipped (no numpy/scipy).
set -u
if [ $# -ne 2 ]; then
    echo "usage: floors_oracle.sh PLANTSIEVE SOURCE_DIR" >&2
    exit 2
fi
ps=$1
src=$2
catalog=$src/tests/data/oracle/oracle-plants.yaml

# Debian's python3 (with numpy/scipy) is on the POSIX default PATH; the first
# python3 on PATH may be another interpreter without them.
py=$(command -p -v python3 2>/dev/null || true)
if [ -z "$py" ] || ! "$py" -c 'import numpy, scipy.linalg, scipy.integrate' >/dev/null 2>&1; then
    echo "SKIPPED: numpy/scipy not importable by Debian's python3 (command -p python3)"
    exit 77
fi

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$ps" survey --json "$catalog" >"$tmp/survey.json" 2>"$tmp/err"
rc=$?
if [ $rc -ne 0 ]; then
    echo "FAIL: plantsieve survey --json $catalog exited $rc"
    sed 's/^/    /' "$tmp/err"
    exit 1
fi
"$py" "$src/tests/oracle/floors_oracle.py" "$catalog" "$tmp/survey.json"
