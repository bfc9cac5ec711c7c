#!/bin/sh
# report_set.sh - the report set of `plantsieve screen -o DIR` is always whole:
# a reader of DIR sees the previous set or the new one, never a mix, a half
# file or a temporary, whatever happens to the run. Usage: report_set.sh PLANTSIEVE SOURCE_DIR
set -u
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
# Every entry under DIR (hidden ones too) with the hash of every file, by path relative to DIR.
snapshot() { # snapshot DIR OUT (HTML reports hashed without the command line: it names DIR)
    (cd "$1" && { find . -mindepth 1 -type d | sed 's/^/dir /'; find . -mindepth 1 ! -type d ! -name '*.html' -exec sha256sum {} +
        find . -mindepth 1 -name '*.html' | while read -r h; do echo "$(unlike_cmdline "$h" | sha256sum | cut -c1-64)  $h"; done; } | sort) >"$2"
}
same() { # same NAME SNAPSHOT_A SNAPSHOT_B
    if cmp -s "$2" "$3"; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: $1:"; diff "$2" "$3" | sed 's/^/    /'; fi
}
# Files under DIR other than a lock file (the reports and any temporary).
files_of() { find "$1" -type f ! -name '*.lock' | sort; }
# Wait (at most 60 s) until a file that was not under DIR before appears, i.e.
# until the run starts writing its reports; true when it did while PID runs.
wait_new_file() { # wait_new_file DIR BEFORE_LIST PID
    i=0
    while [ $i -lt 3000 ]; do
        files_of "$1" >"$tmp/now.list"
        if ! cmp -s "$2" "$tmp/now.list"; then kill -0 "$3" 2>/dev/null; return $?; fi
        kill -0 "$3" 2>/dev/null || return 1
        sleep 0.02
        i=$((i + 1))
    done
    return 1
}

# Two catalogs with the same stem (big), different plants; the set of the
# larger (b) is tens of MB, so writing it takes long enough to be caught in the act.
mkdir "$tmp/a" "$tmp/b"
"$py" "$src/tests/bench/gen_catalog.py" 3000 "$tmp/a/big.yaml" --seed 2385 >/dev/null || exit 1
"$py" "$src/tests/bench/gen_catalog.py" 10000 "$tmp/b/big.yaml" --seed 7919 >/dev/null || exit 1
cd "$tmp" || exit 1
opts="--gate never --quiet --detail none --threads 2"
"$ps" screen $opts -o ref-a a/big.yaml >/dev/null 2>&1; check "reference run a" 0 $?
"$ps" screen $opts -o ref-b b/big.yaml >/dev/null 2>&1; check "reference run b" 0 $?
snapshot ref-a ref-a.snap
snapshot ref-b ref-b.snap

# 1. SIGTERM or SIGINT while the reports are being written: the old set,
#    whole, and no temporary. A background job of a script starts with SIGINT
#    ignored (and plantsieve leaves an ignored signal ignored): env gives it
#    back its default, as an interactive shell would.
for sig in TERM INT; do
    case $sig in TERM) signo=15 ;; INT) signo=2 ;; esac
    rm -rf set
    "$ps" screen $opts -o set a/big.yaml >/dev/null 2>&1; check "SIG$sig: first run" 0 $?
    files_of set >before.list
    env --default-signal=$sig "$ps" screen $opts -o set b/big.yaml >/dev/null 2>"sig$sig.err" &
    pid=$!
    wait_new_file set before.list $pid; check "SIG$sig: the second run was caught writing" 0 $?
    kill -$sig $pid
    wait $pid
    rc=$?
    check "SIG$sig: the interrupted run exits 128 + the signal number" $((128 + signo)) $rc
    contains "SIG$sig: the interrupt is told" "sig$sig.err" "interrupted by SIG$sig: no report of this run was published; the previous reports in set are left as they were"
    snapshot set after.snap
    if cmp -s after.snap ref-b.snap; then
        echo "note: SIG$sig arrived after the new set was published"
        pass=$((pass + 1))
    else
        same "SIG$sig: the previous set is left whole, with no temporary beside it" ref-a.snap after.snap
    fi
done

# 2. SIGKILL cannot be caught: the staging directory stays, hidden, and the
#    next run of the same stem removes it; the set itself is never mixed.
rm -rf set
"$ps" screen $opts -o set a/big.yaml >/dev/null 2>&1
files_of set >before.list
"$ps" screen $opts -o set b/big.yaml >/dev/null 2>&1 &
pid=$!
wait_new_file set before.list $pid; check "SIGKILL: the second run was caught writing" 0 $?
kill -KILL $pid
wait $pid
snapshot set killed.snap
grep -v '/\.big\.screen\.' killed.snap >killed-visible.snap
same "SIGKILL: the published set is the previous one" ref-a.snap killed-visible.snap
"$ps" screen $opts -o set b/big.yaml >/dev/null 2>&1; check "a run after SIGKILL" 0 $?
snapshot set after.snap
same "a run after SIGKILL publishes its set and removes what the killed run left" ref-b.snap after.snap

# 3. Two runs on the same directory and stem: the second is refused at once,
#    with its own exit code and a message, and the first completes.
rm -rf conc
mkdir small
cp "$src/tests/data/e2e/closed-form.yaml" small/big.yaml
"$ps" screen $opts -o conc b/big.yaml >/dev/null 2>conc-a.err &
pid=$!
i=0
while [ ! -e conc/.big.screen.lock ] && [ $i -lt 500 ]; do sleep 0.01; i=$((i + 1)); done
kill -0 $pid 2>/dev/null; check "concurrent: the first run is still running" 0 $?
"$ps" screen --gate never --quiet -o conc small/big.yaml >/dev/null 2>conc-b.err; check "concurrent: the second run is refused (exit 5)" 5 $?
contains "concurrent: the refusal says why" conc-b.err "another plantsieve run is writing the same reports into conc"
wait $pid; check "concurrent: the first run completes" 0 $?
snapshot conc conc.snap
same "concurrent: the set is the first run's, whole, and the lock is gone" ref-b.snap conc.snap
# Another stem in the same directory is not held up by the lock.
cp small/big.yaml small/other.yaml
"$ps" screen --gate never --quiet -o conc small/other.yaml >/dev/null 2>&1; check "another stem in the same directory runs" 0 $?

# 4. A run without families after one with families: no families CSV of the old run.
mkdir fam nofam
cp "$src/catalogs/demo-variants.yaml" fam/cat.yaml
cp "$src/tests/data/e2e/closed-form.yaml" nofam/cat.yaml
"$ps" screen --gate never --quiet -o famset fam/cat.yaml >/dev/null 2>&1; check "families: first run" 0 $?
[ -e famset/cat.screen/cat.screen.families.csv ]; check "families: the first run wrote a families CSV" 0 $?
"$ps" screen --gate never --quiet -o famset nofam/cat.yaml >/dev/null 2>&1; check "families: second run" 0 $?
find famset -name '*families*' >fam.list
[ -s fam.list ]; check "families: no families CSV of the old run is left" 1 $?
"$ps" screen --gate never --quiet -o ref-nofam nofam/cat.yaml >/dev/null 2>&1
snapshot ref-nofam ref-nofam.snap
snapshot famset famset.snap
same "families: the set is the second run's alone" ref-nofam.snap famset.snap

# 5. A write that fails half-way (file size limit: EFBIG; below, a full file
#    system: ENOSPC): exit 4, the previous set whole, nothing else left.
"$ps" screen --gate never --quiet -o full nofam/cat.yaml >/dev/null 2>&1; check "file size limit: first run" 0 $?
snapshot full before.snap
# 200 blocks of 512 bytes: the new text report fits, its JSON does not.
(trap '' XFSZ; ulimit -f 200; exec "$ps" screen --gate never --quiet -o full fam/cat.yaml >/dev/null 2>full.err)
check "file size limit: the run fails with exit 4" 4 $?
contains "file size limit: the reason is told" full.err "File too large"
contains "file size limit: nothing published" full.err "no report of this run was published; the previous reports in full are left as they were"
snapshot full after.snap
same "file size limit: the previous set is left whole" before.snap after.snap

if unshare -m true 2>/dev/null && unshare -m sh -c "mount -t tmpfs -o size=320k tmpfs '$tmp/a'" 2>/dev/null; then
    cat >tmpfs.sh <<'SH'
set -u
ps=$1
mkdir -p tfs && mount -t tmpfs -o size=320k tmpfs tfs || exit 90
"$ps" screen --gate never --quiet -o tfs nofam/cat.yaml >/dev/null 2>&1 || exit 91
(cd tfs && { find . -mindepth 1 -type d | sed 's/^/dir /'; find . -mindepth 1 ! -type d -exec sha256sum {} +; } | sort) >tfs-before.snap
"$ps" screen --gate never --quiet -o tfs fam/cat.yaml >/dev/null 2>tfs.err
echo $? >tfs.rc
(cd tfs && { find . -mindepth 1 -type d | sed 's/^/dir /'; find . -mindepth 1 ! -type d -exec sha256sum {} +; } | sort) >tfs-after.snap
umount tfs
SH
    unshare -m sh tmpfs.sh "$ps"; check "full file system: the set-up runs" 0 $?
    check "full file system: the run fails with exit 4" 4 "$(cat tfs.rc)"
    contains "full file system: the reason is told" tfs.err "No space left on device"
    same "full file system: the previous set is left whole" tfs-before.snap tfs-after.snap
else
    echo "note: no private mount namespace here; the full file system case is not run (the file size limit case is)"
fi

# 6. A directory this user cannot write: refused before any work, previous set whole.
if [ "$(id -u)" = 0 ] && command -v setpriv >/dev/null; then
    as_other="setpriv --reuid=65534 --regid=65534 --clear-groups"
else
    as_other=""
fi
"$ps" screen --gate never --quiet -o ro nofam/cat.yaml >/dev/null 2>&1
snapshot ro before.snap
chmod 555 ro
chmod 755 "$tmp" nofam fam
chmod 644 fam/cat.yaml
$as_other "$ps" screen --gate never --quiet -o ro fam/cat.yaml >/dev/null 2>ro.err; check "unwritable directory: exit 4" 4 $?
contains "unwritable directory: the reason is told" ro.err "Permission denied"
chmod 755 ro
snapshot ro after.snap
same "unwritable directory: the previous set is left whole" before.snap after.snap

echo "report_set: $pass passed, $fail failed"
[ $fail -eq 0 ]
