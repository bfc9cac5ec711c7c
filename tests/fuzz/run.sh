#!/usr/bin/env bash
# run.sh - runs each libFuzzer entry for a given time and prints, per fuzzer,
# executions, coverage and findings (crash, timeout, out-of-memory, leak files).
#
# Usage: tests/fuzz/run.sh BUILD_DIR SECONDS [FUZZER...]
#   BUILD_DIR  a build configured with CC=clang -DPS_FUZZ=ON (fuzzers built there)
#   SECONDS    time per fuzzer
#   FUZZER     any of yaml csv expr screen compare (default: all five, one after another)
# Environment: PS_FUZZ_KEEP=1 merges the inputs that add coverage into
# tests/fuzz/corpus/<fuzzer>/ (libFuzzer -merge=1); PS_FUZZ_OUT=DIR keeps the
# work (new inputs, findings, logs) there instead of a temporary directory.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
if [ $# -lt 2 ]; then
    echo "usage: $0 BUILD_DIR SECONDS [yaml|csv|expr|screen|compare ...]" >&2
    exit 2
fi
build="$1"
secs="$2"
shift 2
fuzzers=("$@")
[ ${#fuzzers[@]} -gt 0 ] || fuzzers=(yaml csv expr screen compare)
out="${PS_FUZZ_OUT:-$(mktemp -d "${TMPDIR:-/tmp}/psfuzz-run.XXXXXX")}"
mkdir -p "$out"

status=0
printf '%-8s %8s %12s %10s %8s %8s %9s\n' fuzzer seconds executions exec/s cov ft findings
for f in "${fuzzers[@]}"; do
    bin="$build/tests/fuzz/fuzz_$f"
    corpus="$here/corpus/$f"
    if [ ! -x "$bin" ]; then
        echo "$0: $bin missing: configure $build with CC=clang -DPS_FUZZ=ON and build fuzz_$f" >&2
        exit 2
    fi
    work="$out/$f"
    mkdir -p "$work/new" "$work/findings"
    # -max_len: the hand-made files past 1 MiB stay in the corpus (replayed
    # whole by ctest) but mutations start from their first 4 KiB.
    "$bin" -max_total_time="$secs" -max_len=4096 -timeout=10 -rss_limit_mb=2048 \
        -print_final_stats=1 -artifact_prefix="$work/findings/" \
        "$work/new" "$corpus" >"$work/log" 2>&1 || true
    execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$work/log" | tail -1)
    rate=$(sed -n 's/^stat::average_exec_per_sec: *//p' "$work/log" | tail -1)
    last=$(grep -E '^#[0-9]+' "$work/log" | tail -1 || true)
    cov=$(sed -n 's/.* cov: \([0-9]*\).*/\1/p' <<<"$last")
    ft=$(sed -n 's/.* ft: \([0-9]*\).*/\1/p' <<<"$last")
    found=$(find "$work/findings" -type f | wc -l)
    printf '%-8s %8s %12s %10s %8s %8s %9s\n' "$f" "$secs" "${execs:-?}" "${rate:-?}" "${cov:-?}" "${ft:-?}" "$found"
    if [ "$found" -gt 0 ]; then
        status=1
        find "$work/findings" -type f | sed 's/^/    finding: /'
        grep -E 'ERROR: |SUMMARY: |plantsieve fuzz: ' "$work/log" | head -5 | sed 's/^/    /'
    fi
    if [ "${PS_FUZZ_KEEP:-0}" = 1 ]; then
        before=$(find "$corpus" -type f | wc -l)
        "$bin" -merge=1 -max_len=4096 -timeout=10 "$corpus" "$work/new" >"$work/merge.log" 2>&1 || true
        after=$(find "$corpus" -type f | wc -l)
        echo "    kept $((after - before)) new inputs in $corpus"
    fi
done
echo "work, logs and findings: $out"
exit $status
