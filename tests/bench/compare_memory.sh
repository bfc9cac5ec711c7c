#!/bin/sh
# compare_memory.sh - peak memory and time of `plantsieve compare` on two
# synthetic JSON Lines plant files of N rows each (default 1000000), REPS
# runs (default 3): median wall and CPU seconds, peak RSS, bytes per plant,
# and MET/MISS against the target (peak RSS at most 200 bytes per plant plus
# 16 MB, with ids of 8 characters). Not a ctest test.
# Usage: tests/bench/compare_memory.sh [N]   (PLANTSIEVE=path, REPS=k, BENCH_DIR=dir)
set -eu
n=${1:-1000000}
ps=${PLANTSIEVE:-build/plantsieve}
reps=${REPS:-3}
dir=${BENCH_DIR:-${TMPDIR:-/tmp}/plantsieve-bench}
py=$(command -p -v python3)
mkdir -p "$dir"
old=$dir/cmp-old-$n.plants.jsonl
new=$dir/cmp-new-$n.plants.jsonl
if [ ! -s "$new" ]; then
    # Every 7th plant's severity moves, every 11th changes verdict, 1 in 1000
    # is removed and replaced by a new one.
    "$py" - "$n" "$old" "$new" <<'PY'
import sys
n, old, new = int(sys.argv[1]), sys.argv[2], sys.argv[3]
verdicts = ["clear", "marginal", "redesign"]
def row(rank, pid, v, sev):
    return ('{"rank": %d, "id": "%s", "verdict": "%s", "severity": %.15g, "severity_infinite": false, '
            '"file": "bench.yaml", "line": %d}\n' % (rank, pid, v, sev, 3 + 7 * rank))
with open(old, "w") as a, open(new, "w") as b:
    for i in range(n):
        a.write(row(i + 1, "p%07d" % i, verdicts[i % 3], 0.2385 + (i % 97) / 50))
        pid = "p%07d" % i if i % 1000 else "q%07d" % i
        v = verdicts[(i + (i % 11 == 0)) % 3]
        b.write(row(i + 1, pid, v, 0.2385 + (i % 97) / 50 + (0.05 if i % 7 == 0 else 0)))
PY
fi
echo "machine: $(nproc) CPUs; load average at start: $(cut -d' ' -f1-3 /proc/loadavg)"
echo "plantsieve compare on $n + $n plants ($reps runs)"
: >"$dir/cmp-times"
i=0
while [ $i -lt "$reps" ]; do
    /usr/bin/time -f "%e %U %S %M" -o "$dir/cmp-time" "$ps" compare --quiet --gate never "$old" "$new"
    cat "$dir/cmp-time" >>"$dir/cmp-times"
    i=$((i + 1))
done
echo "load average at end: $(cut -d' ' -f1-3 /proc/loadavg)"
"$py" - "$dir/cmp-times" "$n" <<'PY'
import statistics, sys
rows = [list(map(float, l.split())) for l in open(sys.argv[1]) if l.strip()]
n = int(sys.argv[2])
wall = statistics.median(r[0] for r in rows)
cpu = statistics.median(r[1] + r[2] for r in rows)
rss = statistics.median(r[3] for r in rows) * 1024
print("median wall %.2f s, CPU %.2f s, peak RSS %.1f MB (%.0f bytes per plant)" % (wall, cpu, rss / 1e6, rss / n))
target = 200 * n + 16e6
print("target peak RSS <= %.1f MB: %s" % (target / 1e6, "MET" if rss <= target else "MISS"))
PY
