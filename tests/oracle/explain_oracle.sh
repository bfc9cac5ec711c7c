#!/bin/sh
# explain_oracle.sh - every value printed by `plantsieve explain` for the plants
# of four catalogs, recomputed with numpy/scipy from the plant it prints
# (explain_oracle.py, on the formulas of floors_oracle.py).
# Usage: explain_oracle.sh PLANTSIEVE SOURCE_DIR
# Exit 0 pass, 1 mismatch or tool failure, 77 skipped (no numpy/scipy).
set -u
if [ $# -ne 2 ]; then
    echo "usage: explain_oracle.sh PLANTSIEVE SOURCE_DIR" >&2
    exit 2
fi

# Debian's python3 (with numpy/scipy) is on the POSIX default PATH; the first
# python3 on PATH may be another interpreter without them.
py=$(command -p -v python3 2>/dev/null || true)
if [ -z "$py" ] || ! "$py" -c 'import numpy, scipy.linalg, scipy.integrate' >/dev/null 2>&1; then
    echo "SKIPPED: numpy/scipy not importable by Debian's python3 (command -p python3)"
    exit 77
fi
"$py" "$2/tests/oracle/explain_oracle.py" "$1" "$2"
