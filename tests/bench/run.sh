#!/usr/bin/env bash
# Throughput benchmark of plantsieve (not a ctest test): tests/bench/run.sh [SIZES...]
#
# For each size N (default 10000 100000 1000000): generate a catalog with
# gen_catalog.py (cached outside the repository), then measure side by side,
# REPS times each (median wall time, peak RSS = largest of the runs):
#   read    plantsieve read CAT                       (parse only)
#   screen  plantsieve screen --no-files --gate never CAT   (full screening)
#   screen --detail none   the same without redesign targets and band curve
#   screen --show all      the same listing every row (every record through the run file)
#   survey  plantsieve survey CAT > /dev/null         (floors, no targets)
#   files   plantsieve screen --gate never -o DIR CAT  (every report written: txt, csv, json,
#           plants.jsonl, md, html; time over read time, CPU seconds, bytes a plant per format,
#           MET/MISS for the JSON Lines record <= 1500 bytes a plant and for a Markdown and an
#           HTML report bounded (< 8 MiB at every N, its caps)); FILES=0 skips it
#   floors  floors_bench CAT                          (the floors timed apart from reading:
#           check, roots, every floor, severity, verdict; CPU seconds of that part alone)
#   numpy   np_floors.py CAT                          (vectorised baseline; compute and total)
# The commands take turns (read, screen, ..., survey, then the next repetition).
# Targets printed with MET/MISS (the speed issue): floors compute (floors_bench's
# compute CPU; survey CPU - read CPU beside it) at least 5x faster than numpy's compute; at 1M, screen --no-files
# within 1.5x and every report within 3x of the parse-only read (wall; CPU and
# the load average beside it); linear growth (per-plant time within 1.25x of the
# smallest N); peak RSS under 256 MiB at 3M (give 3000000 among the sizes).
# For N above NUMPY_SUBSET, numpy runs on the first NUMPY_SUBSET plants (the
# smaller catalog is a prefix of the larger one) and is extrapolated linearly
# when the full run would exceed NUMPY_BUDGET seconds; the table says so.
#
# Environment: PLANTSIEVE (binary; default build/plantsieve, then
# ../build-bench/plantsieve), FLOORS_BENCH (default tests/floors_bench beside it), BENCH_DIR (cache, default $TMPDIR/plantsieve-bench),
# SEED (1), REPS (3), LARGE_AT (1000000) and REPS_LARGE (1): repetitions from
# that size on, NUMPY_SUBSET (100000), NUMPY_BUDGET (600 s), NUMPY=0 skips numpy.
set -euo pipefail

HERE=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
ROOT=$(cd "$HERE/../.." && pwd)
if [[ -z "${PLANTSIEVE:-}" ]]; then
    for cand in "$ROOT/build/plantsieve" "$ROOT/../build-bench/plantsieve"; do
        [[ -x "$cand" ]] && PLANTSIEVE=$cand && break
    done
fi
PS=${PLANTSIEVE:?set PLANTSIEVE to the plantsieve binary}
FB=${FLOORS_BENCH:-$(dirname "$PS")/tests/floors_bench}
[[ -x "$FB" ]] || { echo "floors_bench not found at $FB (set FLOORS_BENCH)" >&2; exit 2; }
PY=$(command -pv python3)          # Debian's python3 (numpy, scipy, PyYAML), not a pyenv shim
BENCH_DIR=${BENCH_DIR:-${TMPDIR:-/tmp}/plantsieve-bench}
SEED=${SEED:-1}
REPS=${REPS:-3}
LARGE_AT=${LARGE_AT:-1000000}
REPS_LARGE=${REPS_LARGE:-1}
NUMPY_SUBSET=${NUMPY_SUBSET:-100000}
NUMPY_BUDGET=${NUMPY_BUDGET:-600}
NUMPY=${NUMPY:-1}
FILES=${FILES:-1}
SIZES=("$@")
[[ ${#SIZES[@]} -gt 0 ]] || SIZES=(10000 100000 1000000)

mkdir -p "$BENCH_DIR"
GENHASH=$(sha1sum "$HERE/gen_catalog.py" | cut -c1-10)
LOG="$BENCH_DIR/run-$(date +%Y%m%d-%H%M%S).log"
TMP=$(mktemp -d "$BENCH_DIR/tmp.XXXXXX")
trap 'rm -rf "$TMP"' EXIT

say() { printf '%s\n' "$*" | tee -a "$LOG"; }

# Threads: only when this binary's help mentions the option.
SCREEN_OPTS=(--no-files --gate never)
THREADS_NOTE="single-threaded (no --threads in plantsieve screen --help)"
if "$PS" screen --help 2>&1 | grep -q -- '--threads'; then
    SCREEN_OPTS+=(--threads "$(nproc)")
    THREADS_NOTE="screen --threads $(nproc)"
fi

catalog() { # N -> path (generated once per N, seed and generator version)
    local n=$1 f="$BENCH_DIR/bench-$1-s$SEED-$GENHASH.yaml"
    if [[ ! -s "$f" ]]; then
        local t0=$(date +%s%N)
        "$PY" "$HERE/gen_catalog.py" "$n" "${f%.yaml}.part.yaml" --seed "$SEED" >&2 || return 1
        mv "${f%.yaml}.part.yaml" "$f"
        say "# generated $f ($(du -m "$f" | cut -f1) MiB) in $(awk -v a="$t0" -v b="$(date +%s%N)" 'BEGIN {printf "%.1f", (b - a) / 1e9}') s" >&2
    fi
    printf '%s\n' "$f"
}

# run_timed OUT CMD... : wall seconds and peak RSS (KiB) of one run -> "$OUT.t"
run_timed() {
    local out=$1; shift
    local t0 t1 rc=0
    if [[ -x /usr/bin/time ]]; then
        t0=$(date +%s%N)
        /usr/bin/time -v -o "$out.tv" "$@" > "$out.stdout" 2> "$out.stderr" || rc=$?
        t1=$(date +%s%N)
        local rss=$(awk -F': ' '/Maximum resident set size/ {print $2}' "$out.tv")
        awk -F': ' '/User time|System time/ {s += $2} END {printf "%.2f\n", s}' "$out.tv" > "$out.cpu"
    else # python fallback: getrusage(RUSAGE_CHILDREN) around the child
        t0=$(date +%s%N)
        "$PY" -c 'import resource, subprocess, sys
rc = subprocess.call(sys.argv[3:], stdout=open(sys.argv[1], "w"), stderr=open(sys.argv[2], "w"))
print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss, file=sys.stderr); sys.exit(rc)' \
            "$out.stdout" "$out.stderr" "$@" 2> "$out.tv" || rc=$?
        t1=$(date +%s%N)
        local rss=$(tail -1 "$out.tv")
    fi
    echo "$(( (t1 - t0) / 1000 )) ${rss:-0} $rc" > "$out.t"     # microseconds, KiB, exit code
}

median() { sort -g | awk '{a[NR]=$1} END {if (NR == 0) print "nan"; else if (NR % 2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }
maxof() { sort -g | tail -1; }

# run_one NAME N R OKCODES CMD... : repetition R of NAME (warns on an unexpected exit code)
run_one() {
    local name=$1 n=$2 r=$3 ok=$4; shift 4
    run_timed "$TMP/$name-$n-$r" "$@"
    local us kb code
    read -r us kb code < "$TMP/$name-$n-$r.t"
    [[ " $ok " == *" $code "* ]] || say "# WARNING: $name N=$n run $r exited $code: $(head -c 300 "$TMP/$name-$n-$r.stderr")"
}

# summarize NAME N REPS -> M_S (median s), M_RSS (MiB, max), M_CPU (median CPU s), ALL_S
summarize() {
    local name=$1 n=$2 reps=$3 times=() rss=() r us kb code
    for ((r = 1; r <= reps; r++)); do
        read -r us kb code < "$TMP/$name-$n-$r.t"
        times+=("$us"); rss+=("$kb")
    done
    M_S=$(printf '%s\n' "${times[@]}" | median | awk '{printf "%.6f", $1 / 1e6}')
    M_RSS=$(printf '%s\n' "${rss[@]}" | maxof | awk '{printf "%.1f", $1 / 1024}')
    M_CPU=$(for ((r = 1; r <= reps; r++)); do cat "$TMP/$name-$n-$r.cpu" 2>/dev/null || echo nan; done | median)
    ALL_S=$(printf '%s\n' "${times[@]}" | awk '{printf "%s%.3f", (NR > 1 ? " " : ""), $1 / 1e6}')
}

# numpy on CAT: median compute and total over reps -> NP_C, NP_T, NP_RSS
measure_numpy() {
    local cat=$1 n=$2 reps=$3 r comp=() tot=() rss=() flo=()
    NP_FAILED=0
    for ((r = 1; r <= reps; r++)); do
        run_timed "$TMP/numpy-$n-$r" "$PY" "$HERE/np_floors.py" "$cat"
        read -r us kb code < "$TMP/numpy-$n-$r.t"
        if [[ $code != 0 ]]; then # e.g. 137: killed, out of memory (PyYAML holds the whole catalog)
            say "# WARNING: numpy N=$n exited $code: $(tail -c 300 "$TMP/numpy-$n-$r.stderr")"
            NP_FAILED=1
            return 0
        fi
        local line=$(grep '^NP_TIMES' "$TMP/numpy-$n-$r.stdout")
        comp+=("$(sed -E 's/.* compute=([0-9.]+).*/\1/' <<< "$line")")
        flo+=("$(sed -E 's/.* floors=([0-9.]+).*/\1/' <<< "$line")")
        tot+=("$(awk -v us="$us" 'BEGIN {printf "%.6f", us / 1e6}')")    # process wall time
        rss+=("$kb")
        NP_LOAD=$(sed -E 's/.* load=([0-9.]+).*/\1/' <<< "$line")
    done
    NP_C=$(printf '%s\n' "${comp[@]}" | median)
    NP_F=$(printf '%s\n' "${flo[@]}" | median)
    NP_T=$(printf '%s\n' "${tot[@]}" | median)
    NP_RSS=$(printf '%s\n' "${rss[@]}" | maxof | awk '{printf "%.1f", $1 / 1024}')
    NP_SUMMARY=$(grep '^np_floors: verdicts' "$TMP/numpy-$n-1.stdout" | sed 's/^np_floors: //')
}

verdict() { awk -v v="$1" -v lim="$2" -v dir="$3" 'BEGIN {ok = (dir == "le") ? (v <= lim) : (v >= lim); print ok ? "PASS" : "MISS"}'; }
fmt_rate() { awk -v n="$1" -v s="$2" 'BEGIN { if (s > 0) printf "%.0f", n / s; else print "-" }'; }
ratio() { awk -v a="$1" -v b="$2" 'BEGIN { if (b > 0 && a != "") printf "%.2f", a / b; else print "-" }'; }

# ---------------------------------------------------------------- machine
CPU=$(awk -F': ' '/^model name/ {print $2; exit}' /proc/cpuinfo)
MEM=$(awk '/^MemTotal/ {printf "%.1f GiB", $2 / 1048576}' /proc/meminfo)
say "plantsieve benchmark  $(date -u +%Y-%m-%dT%H:%M:%SZ)"
say "machine: nproc $(nproc), CPU \"$CPU\", RAM $MEM, $(uname -sr); load average at start $(cut -d' ' -f1-3 /proc/loadavg)"
say "binary:  $PS ($("$PS" --version 2>&1 | head -1), built $(date -u -r "$PS" +%Y-%m-%dT%H:%M:%SZ)); source HEAD $(git -C "$ROOT" log -1 --format='%h %cd' --date=iso-strict 2>/dev/null || echo '?'); $THREADS_NOTE"
say "python:  $PY $("$PY" -c 'import numpy, scipy, yaml; print("numpy", numpy.__version__, "scipy", scipy.__version__, "PyYAML", yaml.__version__, "libyaml" if yaml.__with_libyaml__ else "pure-python")')"
say "catalogs: gen_catalog.py seed $SEED (cache $BENCH_DIR); repetitions: $REPS (N >= $LARGE_AT: $REPS_LARGE), median wall time, peak RSS = max over runs"
say ""

DETAIL=0; "$PS" screen --help 2>&1 | grep -q -- '--detail' && DETAIL=1
SHOW=0; "$PS" screen --help 2>&1 | grep -q -- '--show' && SHOW=1
declare -A SN_S SN_RSS SA_S SA_RSS
declare -A R_CPU SC_CPU SV_CPU NPF FB_C NPS
declare -A R_S SC_S SV_S R_RSS SC_RSS SV_RSS NPC NPT NPX NPN NPRSS REPN F_S F_RSS F_CPU F_B F_LINES
for n in "${SIZES[@]}"; do
    cat=$(catalog "$n") || { say "generating the N=$n catalog failed"; exit 1; }
    reps=$REPS; (( n >= LARGE_AT )) && reps=$REPS_LARGE
    REPN[$n]=$reps
    # The commands take turns, repetition by repetition (read, screen, ..., survey, then
    # again), so that a change of the machine's load falls on all of them alike.
    for ((r = 1; r <= reps; r++)); do
        run_one read "$n" "$r" "0" "$PS" read "$cat"
        run_one screen "$n" "$r" "0 3" "$PS" screen "${SCREEN_OPTS[@]}" "$cat"
        [[ $DETAIL == 1 ]] && run_one screen-none "$n" "$r" "0 3" "$PS" screen "${SCREEN_OPTS[@]}" --detail none "$cat"
        [[ $SHOW == 1 ]] && run_one screen-all "$n" "$r" "0 3" "$PS" screen "${SCREEN_OPTS[@]}" --show all "$cat"
        if [[ $FILES == 1 ]]; then # every report written, as a user's run does (the set replaced each time)
            run_one files "$n" "$r" "0 3" "$PS" screen --gate never --quiet "${SCREEN_OPTS[@]:3}" -o "$TMP/files" "$cat"
        fi
        run_one survey "$n" "$r" "0 3" "$PS" survey "$cat"
        run_one floors "$n" "$r" "0" "$FB" "$cat"
    done
    summarize read "$n" "$reps"
    got=$(grep -oE '[0-9]+ entries read' "$TMP/read-$n-1.stdout" | cut -d' ' -f1)
    [[ "$got" == "$n" ]] || say "# WARNING: read counted ${got:-?} entries, expected $n"
    R_S[$n]=$M_S; R_RSS[$n]=$M_RSS; R_CPU[$n]=$M_CPU; say "# N=$n read   runs: $ALL_S s (median CPU $M_CPU s)"
    summarize screen "$n" "$reps"
    SC_S[$n]=$M_S; SC_RSS[$n]=$M_RSS; SC_CPU[$n]=$M_CPU
    say "# N=$n screen runs: $ALL_S s (median CPU $M_CPU s); $(grep -m1 '^Counts' "$TMP/screen-$n-1.stdout" || true)"
    if [[ $DETAIL == 1 ]]; then
        summarize screen-none "$n" "$reps"
        SN_S[$n]=$M_S; SN_RSS[$n]=$M_RSS; say "# N=$n screen --detail none runs: $ALL_S s"
    fi
    if [[ $SHOW == 1 ]]; then
        summarize screen-all "$n" "$reps"
        SA_S[$n]=$M_S; SA_RSS[$n]=$M_RSS; say "# N=$n screen --show all runs: $ALL_S s"
    fi
    if [[ $FILES == 1 ]]; then
        summarize files "$n" "$reps"
        F_S[$n]=$M_S; F_RSS[$n]=$M_RSS; F_CPU[$n]=$M_CPU
        stem=$(basename "${cat%.yaml}")
        for ext in txt csv json plants.jsonl md html; do
            F_B[$n,$ext]=$(stat -c %s "$TMP/files/$stem.screen/$stem.screen.$ext" 2>/dev/null || echo 0)
        done
        F_LINES[$n]=$(wc -l < "$TMP/files/$stem.screen/$stem.screen.plants.jsonl")
        say "# N=$n screen with every report runs: $ALL_S s (median CPU $M_CPU s); JSON Lines $(( F_B[$n,plants.jsonl] / n )) B a plant, ${F_LINES[$n]} lines"
        rm -rf "$TMP/files"
    fi
    summarize survey "$n" "$reps"
    SV_S[$n]=$M_S; SV_RSS[$n]=$M_RSS; SV_CPU[$n]=$M_CPU; say "# N=$n survey runs: $ALL_S s (median CPU $M_CPU s)"
    FB_C[$n]=$(for ((r = 1; r <= reps; r++)); do
        sed -nE 's/.* compute ([0-9.]+) s \(CPU\).*/\1/p' "$TMP/floors-$n-$r.stdout"; done | median)
    say "# N=$n floors_bench runs: compute CPU $(for ((r = 1; r <= reps; r++)); do
        sed -nE 's/.* compute ([0-9.]+) s \(CPU\).*/\1/p' "$TMP/floors-$n-$r.stdout"; done | tr '\n' ' ')s (median ${FB_C[$n]} s); $(sed 's/^floors_bench: //' "$TMP/floors-$n-1.stdout")"
    if [[ $NUMPY == 1 ]]; then
        if (( n > NUMPY_SUBSET )); then
            sub=$(catalog "$NUMPY_SUBSET") || { say "generating the N=$NUMPY_SUBSET catalog failed"; exit 1; }
            if [[ -n "${NPN[$NUMPY_SUBSET]:-}" && "${NPX[$NUMPY_SUBSET]}" == measured ]]; then
                NP_C=${NPC[$NUMPY_SUBSET]}; NP_T=${NPT[$NUMPY_SUBSET]}; NP_RSS=${NPRSS[$NUMPY_SUBSET]}; NP_F=${NPF[$NUMPY_SUBSET]}
                say "# N=$n numpy: reusing the N=$NUMPY_SUBSET measurement as the subset"
            else
                measure_numpy "$sub" "$NUMPY_SUBSET" "$REPS"
                say "# N=$n numpy subset N=$NUMPY_SUBSET runs: compute $NP_C s, total $NP_T s (medians); $NP_SUMMARY"
            fi
            est=$(awk -v t="$NP_T" -v n="$n" -v m="$NUMPY_SUBSET" 'BEGIN {printf "%.0f", t * n / m}')
            SUB_C=$NP_C; SUB_T=$NP_T; SUB_F=$NP_F; SUB_RSS=$NP_RSS; NP_FAILED=0
            if (( est <= NUMPY_BUDGET )); then
                measure_numpy "$cat" "$n" "$reps"
                if [[ $NP_FAILED == 1 ]]; then
                    say "# N=$n numpy: the full run failed: extrapolated linearly from N=$NUMPY_SUBSET instead"
                    NP_C=$SUB_C; NP_T=$SUB_T; NP_F=$SUB_F; NP_RSS=$SUB_RSS
                fi
            fi
            if (( est > NUMPY_BUDGET )) || [[ $NP_FAILED == 1 ]]; then
                NPC[$n]=$(awk -v t="$NP_C" -v n="$n" -v m="$NUMPY_SUBSET" 'BEGIN {printf "%.6f", t * n / m}')
                NPT[$n]=$(awk -v t="$NP_T" -v n="$n" -v m="$NUMPY_SUBSET" 'BEGIN {printf "%.6f", t * n / m}')
                NPF[$n]=$(awk -v t="$NP_F" -v n="$n" -v m="$NUMPY_SUBSET" 'BEGIN {printf "%.6f", t * n / m}')
                NPX[$n]="extrapolated x$((n / NUMPY_SUBSET)) from the first $NUMPY_SUBSET plants"
                NPRSS[$n]="$NP_RSS@$NUMPY_SUBSET"
                say "# N=$n numpy: full run estimated ${est} s > NUMPY_BUDGET ${NUMPY_BUDGET} s: extrapolated linearly from N=$NUMPY_SUBSET"
            else
                NPC[$n]=$NP_C; NPT[$n]=$NP_T; NPF[$n]=$NP_F; NPX[$n]=measured; NPRSS[$n]=$NP_RSS
                say "# N=$n numpy runs: compute $NP_C s, total $NP_T s (medians); $NP_SUMMARY"
            fi
        else
            measure_numpy "$cat" "$n" "$reps"
            NPC[$n]=$NP_C; NPT[$n]=$NP_T; NPF[$n]=$NP_F; NPX[$n]=measured; NPRSS[$n]=$NP_RSS
            say "# N=$n numpy runs: compute $NP_C s, total $NP_T s (medians), YAML load $NP_LOAD s (last run); $NP_SUMMARY"
        fi
        NPN[$n]=$n
        NPS[$n]=${NP_SUMMARY:-}
    fi
done

# ---------------------------------------------------------------- tables
say ""
say "Throughput (plants/s, median of the runs), peak RSS and ratios of wall times"
hdr=$(printf '%9s %4s | %9s %9s %9s | %7s %7s %7s | %11s %11s | %12s %12s %12s' \
    N reps read screen survey "RSS rd" "RSS sc" "RSS sv" screen/read survey/read \
    np/screen:c np/screen:t np/survey:c)
say "$hdr"
say "$(printf '%s' "$hdr" | tr -c '|' '-')"
for n in "${SIZES[@]}"; do
    mark=""; [[ "${NPX[$n]:-}" == extrapolated* ]] && mark="*"
    say "$(printf '%9s %4s | %9s %9s %9s | %7s %7s %7s | %11s %11s | %12s %12s %12s' \
        "$n" "${REPN[$n]}" "$(fmt_rate "$n" "${R_S[$n]}")" "$(fmt_rate "$n" "${SC_S[$n]}")" \
        "$(fmt_rate "$n" "${SV_S[$n]}")" "${R_RSS[$n]}" "${SC_RSS[$n]}" "${SV_RSS[$n]}" \
        "$(ratio "${SC_S[$n]}" "${R_S[$n]}")" "$(ratio "${SV_S[$n]}" "${R_S[$n]}")" \
        "$(ratio "${NPC[$n]:-}" "${SC_S[$n]}")$mark" "$(ratio "${NPT[$n]:-}" "${SC_S[$n]}")$mark" \
        "$(ratio "${NPC[$n]:-}" "${SV_S[$n]}")$mark")"
done
say ""
say "Wall times (s; median) and numpy baseline"
hdr=$(printf '%9s | %9s %9s %9s | %10s %10s %11s %10s | %s' N read screen survey "np compute" "np total" "np pl/s(c)" "np RSS" "numpy run")
say "$hdr"
say "$(printf '%s' "$hdr" | tr -c '|' '-')"
for n in "${SIZES[@]}"; do
    say "$(printf '%9s | %9.3f %9.3f %9.3f | %10s %10s %11s %10s | %s' "$n" "${R_S[$n]}" "${SC_S[$n]}" "${SV_S[$n]}" \
        "$(awk -v x="${NPC[$n]:-}" 'BEGIN {if (x == "") print "-"; else printf "%.3f", x}')" \
        "$(awk -v x="${NPT[$n]:-}" 'BEGIN {if (x == "") print "-"; else printf "%.3f", x}')" \
        "$(fmt_rate "$n" "${NPC[$n]:-0}")" "${NPRSS[$n]:--}" "${NPX[$n]:-not run}")"
done
if [[ $DETAIL == 1 ]]; then
    for n in "${SIZES[@]}"; do
        say "$(printf '%9s | screen --detail none %9.3f s, %s plants/s, peak RSS %s MiB, over read %s' "$n" "${SN_S[$n]}" \
            "$(fmt_rate "$n" "${SN_S[$n]}")" "${SN_RSS[$n]}" "$(ratio "${SN_S[$n]}" "${R_S[$n]}")")"
    done
fi
if [[ $SHOW == 1 ]]; then
    for n in "${SIZES[@]}"; do
        say "$(printf '%9s | screen --show all    %9.3f s, %s plants/s, peak RSS %s MiB, over read %s' "$n" "${SA_S[$n]}" \
            "$(fmt_rate "$n" "${SA_S[$n]}")" "${SA_RSS[$n]}" "$(ratio "${SA_S[$n]}" "${R_S[$n]}")")"
    done
    say "  (--show all: every row on stdout, so every record goes through the run file, as in a run"
    say "   that writes the report files; the default listing stops at 40 rows a list and keeps only those)"
fi
say ""
say "Columns: RSS rd/sc/sv = peak RSS in MiB of read/screen/survey. np/screen:c = numpy compute time"
say "(prepare + floors, no YAML load) over screen time, np/screen:t = numpy process total (imports +"
say "YAML load + compute) over screen time, np/survey:c = numpy compute over survey time: each is how"
say "many times faster plantsieve is (below 1: slower). numpy computes floors and severity only, no"
say "redesign targets; screen also computes targets and the ranking. * = numpy extrapolated linearly."

if [[ $FILES == 1 ]]; then
    say ""
    say "Screen with every report written (-o DIR): median wall time, CPU seconds (user + sys), bytes a plant"
    hdr=$(printf '%9s | %9s %8s %8s %8s | %7s %7s %7s %8s %7s %7s | %s' N "files s" "CPU s" "/read" "/screen" \
        txt csv json jsonl md html "RSS MiB")
    say "$hdr"
    say "$(printf '%s' "$hdr" | tr -c '|' '-')"
    for n in "${SIZES[@]}"; do
        say "$(printf '%9s | %9.3f %8s %8s %8s | %7.0f %7.0f %7.2f %8.0f %7.1f %7.0f | %s' "$n" "${F_S[$n]}" "${F_CPU[$n]}" \
            "$(ratio "${F_S[$n]}" "${R_S[$n]}")" "$(ratio "${F_S[$n]}" "${SC_S[$n]}")" \
            "$(awk -v b="${F_B[$n,txt]}" -v n="$n" 'BEGIN {print b / n}')" "$(awk -v b="${F_B[$n,csv]}" -v n="$n" 'BEGIN {print b / n}')" \
            "$(awk -v b="${F_B[$n,json]}" -v n="$n" 'BEGIN {print b / n}')" "$(awk -v b="${F_B[$n,plants.jsonl]}" -v n="$n" 'BEGIN {print b / n}')" \
            "$(awk -v b="${F_B[$n,md]}" -v n="$n" 'BEGIN {print b / n}')" "$(awk -v b="${F_B[$n,html]}" -v n="$n" 'BEGIN {print b / n}')" \
            "${F_RSS[$n]}")"
    done
    for n in "${SIZES[@]}"; do
        say "$(printf '%9s | whole files: json %s B, md %s B, html %s B, plants.jsonl %s B (%s lines)' "$n" "${F_B[$n,json]}" "${F_B[$n,md]}" "${F_B[$n,html]}" "${F_B[$n,plants.jsonl]}" "${F_LINES[$n]}")"
    done
    say "  (/read, /screen: the with-files time over the parse-only read and over screen --no-files)"
fi

# ---------------------------------------------------------------- targets
say ""
say "Targets (misses are shown, not hidden)"
if [[ $FILES == 1 ]]; then
    for n in "${SIZES[@]}"; do
        b=$(awk -v b="${F_B[$n,plants.jsonl]}" -v n="$n" 'BEGIN {printf "%.0f", b / n}')
        say "  JSON: the full record <= 1500 bytes a plant at N=$n: $b B (summary ${F_B[$n,json]} B)  -> $(verdict "$b" 1500 le | sed 's/PASS/MET/')"
    done
    mdmax=0; htmax=0
    for n in "${SIZES[@]}"; do
        (( F_B[$n,md] > mdmax )) && mdmax=${F_B[$n,md]}
        (( F_B[$n,html] > htmax )) && htmax=${F_B[$n,html]}
    done
    say "  Markdown bounded (< 1 MiB at every N): largest $mdmax B  -> $(verdict "$mdmax" 1048575 le | sed 's/PASS/MET/')"
    say "  HTML bounded (< 8 MiB at every N: its caps, 500 ranking rows and 200 plant sections with their figures): largest $htmax B  -> $(verdict "$htmax" 8388607 le | sed 's/PASS/MET/')"
fi
last=${SIZES[${#SIZES[@]}-1]}; first=${SIZES[0]}
for n in "${SIZES[@]}"; do (( n > last )) && last=$n; (( n < first )) && first=$n; done
big=""
for n in "${SIZES[@]}"; do (( n >= 1000000 )) && big=$n && break; done
load_now=$(cut -d' ' -f1-3 /proc/loadavg)
# Compute against compute. plantsieve's floors = floors_bench's compute CPU: check, roots
# (RHP counts, hidden modes), every floor (Bode area, single-point and joint interpolation,
# band-forced with the roll-off tail, Poisson, effort), severity and verdict, timed apart from
# reading, on one thread. numpy's = its "compute": prepare (YAML mappings to arrays) and floors
# (roots, the same floors incl. the joint Pick/Chen floors, severity, verdict); stricter, its
# vectorised floors alone. Beside it, survey CPU - read CPU (the survey also checks ids for
# duplicates and formats a text listing of every plant's roots and floors, which numpy does not).
for n in "${SIZES[@]}"; do
    [[ -n "${NPC[$n]:-}" ]] || continue
    pc=$(awk -v a="${FB_C[$n]}" 'BEGIN {printf "%.3f", (a > 0.001 ? a : 0.001)}')
    c=$(ratio "${NPC[$n]}" "$pc"); f=$(ratio "${NPF[$n]}" "$pc")
    sv=$(awk -v a="${SV_CPU[$n]}" -v b="${R_CPU[$n]}" 'BEGIN {d = a - b; printf "%.3f", (d > 0.001 ? d : 0.001)}')
    say "  floors, compute only, at N=$n: numpy compute ${NPC[$n]} s (of it vectorised floors ${NPF[$n]} s), plantsieve floors_bench compute $pc s CPU: ${c}x (floors alone ${f}x), at least 5x -> $(verdict "$c" 5 ge | sed 's/PASS/MET/')$([[ "${NPX[$n]}" == measured ]] || echo " (numpy ${NPX[$n]})")"
    # the two sides judge alike: numpy's verdict counts against floors_bench's
    npv=$(sed -E 's/^verdicts //; s/,//g' <<< "${NPS[$n]:-}")
    fbv=$(sed -E 's/.*verdicts //; s/ needs-bandwidth.*//; s/,//g' "$TMP/floors-$n-1.stdout")
    if [[ -n "$npv" && "$npv" == "$fbv" ]]; then
        say "    same verdict counts on both sides: $fbv"
    else
        say "    # WARNING: the verdict counts differ: numpy '$npv', floors_bench '$fbv'"
    fi
    say "    (survey CPU - read CPU, floors plus a text listing of every plant: ${SV_CPU[$n]} - ${R_CPU[$n]} = $sv s: $(ratio "${NPC[$n]}" "$sv")x)"
done
if [[ -n "$big" ]]; then
    r=$(ratio "${SC_S[$big]}" "${R_S[$big]}"); rc=$(ratio "${SC_CPU[$big]}" "${R_CPU[$big]}")
    say "  full screen (targets, band curve), no report files, within 1.5x of parse-only at N=$big: wall ${SC_S[$big]} / ${R_S[$big]} s = $r (CPU ${SC_CPU[$big]} / ${R_CPU[$big]} s = $rc; screen on $(nproc) threads, read on one), load $load_now  -> $(verdict "$r" 1.5 le | sed 's/PASS/MET/')"
    if [[ $DETAIL == 1 ]]; then
        say "    (--detail none, floors, verdicts and ranking without targets: $(ratio "${SN_S[$big]}" "${R_S[$big]}"))"
    fi
    if [[ $FILES == 1 ]]; then
        r=$(ratio "${F_S[$big]}" "${R_S[$big]}"); rc=$(ratio "${F_CPU[$big]}" "${R_CPU[$big]}")
        say "  full screen writing every report within 3x of parse-only at N=$big: wall ${F_S[$big]} / ${R_S[$big]} s = $r (CPU ${F_CPU[$big]} / ${R_CPU[$big]} s = $rc)  -> $(verdict "$r" 3 le | sed 's/PASS/MET/')"
    fi
else
    say "  full screen within 1.5x, and with every report within 3x, of parse-only at 1M: not measured (largest N = $last; there screen/read = $(ratio "${SC_S[$last]}" "${R_S[$last]}"))"
fi
big3=""
for n in "${SIZES[@]}"; do (( n >= 3000000 )) && big3=$n && break; done
if [[ -n "$big3" ]]; then
    rss=$(printf '%s\n' "${R_RSS[$big3]}" "${SC_RSS[$big3]}" "${SV_RSS[$big3]}" "${F_RSS[$big3]:-0}" | maxof)
    say "  peak RSS < 256 MiB at N=$big3: read ${R_RSS[$big3]}, screen ${SC_RSS[$big3]}, survey ${SV_RSS[$big3]}, with reports ${F_RSS[$big3]:--} MiB  -> $(verdict "$rss" 255.999 le | sed 's/PASS/MET/')"
else
    say "  peak RSS < 256 MiB at 3M: not measured (largest N = $last: screen ${SC_RSS[$last]} MiB, with reports ${F_RSS[$last]:--} MiB); give 3000000 among the sizes"
fi
if (( ${#SIZES[@]} > 1 )); then
    for cmd in read screen survey; do
        line=""; worst=1
        for n in "${SIZES[@]}"; do
            case $cmd in read) s=${R_S[$n]};; screen) s=${SC_S[$n]};; survey) s=${SV_S[$n]};; esac
            case $cmd in read) s0=${R_S[$first]};; screen) s0=${SC_S[$first]};; survey) s0=${SV_S[$first]};; esac
            g=$(awk -v s="$s" -v n="$n" -v s0="$s0" -v n0="$first" 'BEGIN {printf "%.2f", (s / n) / (s0 / n0)}')
            line+=" N=$n ${g}"
            worst=$(printf '%s\n' "$worst" "$g" | maxof)
        done
        say "  linear growth, $cmd: time per plant relative to N=$first:$line -> $(verdict "$worst" 1.25 le | sed 's/PASS/MET/') (limit 1.25)"
    done
    prev=""
    for n in "${SIZES[@]}"; do
        if [[ -n "$prev" ]]; then
            say "  screen RSS growth N=$prev..$n: $(awk -v a="${SC_RSS[$prev]}" -v b="${SC_RSS[$n]}" -v m="$prev" -v n="$n" 'BEGIN {printf "%.2f KiB per plant", (b - a) * 1024 / (n - m)}'); survey: $(awk -v a="${SV_RSS[$prev]}" -v b="${SV_RSS[$n]}" -v m="$prev" -v n="$n" 'BEGIN {printf "%.3f KiB per plant", (b - a) * 1024 / (n - m)}')"
        fi
        prev=$n
    done
fi
say ""
say "load average at the end: $(cut -d' ' -f1-3 /proc/loadavg) (other processes on this machine share its $(nproc) cores)"
say "log: $LOG"
