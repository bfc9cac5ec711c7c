#!/bin/sh
# shard_slurm.sh - shard-and-merge run as a Slurm job array on a throw-away
# one-node cluster on this machine: the documented job scripts
# docs/slurm/shard-array.sbatch (an array of 4 tasks, one shard each) and
# docs/slurm/merge.sbatch (afterok on the array) are submitted as they are;
# the merged listing, every report and the exit code equal the single run's
# (byte for byte once the command line they quote is replaced).
#
# It starts its own daemons, all under $tmp and on two free loopback ports:
# munged (a fresh key, its own socket, pid, log and seed files; nothing in
# /etc or /run is used), slurmctld and slurmd (a slurm.conf written here,
# proctrack/linuxproc and task/none, so no cgroup is needed). All three are
# stopped on exit, also on failure. Why it may not run, and then exits 77
# (skipped) with the reason:
#  - not root: slurmd must run as root to start jobs as their user;
#  - Debian's slurm-wlm and munge are not installed (apt-get install
#    slurm-wlm munge; installing them tries to start the system-wide
#    services, which a container's policy-rc.d refuses: harmless here);
#  - the daemons do not come up within 60 s (not seen here; the skip line
#    gives the node's state, the logs are in $tmp/log while it runs).
# Seen on a Debian 12 machine as root (cgroup v1, no systemd), Slurm 22.05.8,
# munge 0.5.15: the node idle within 1 s of starting slurmd, the array and
# the merge done in 8 to 10 s, the whole test about 15 s.
# Usage: shard_slurm.sh PLANTSIEVE SRCDIR
ps=$1
src=$2
. "$src/tests/e2e/lib.sh"
export SOURCE_DATE_EPOCH=1764892800
skip() { echo "skipped: $*"; exit 77; }
[ "$(id -u)" = 0 ] || skip "Slurm's slurmd must run as root"
for c in sbatch squeue sinfo scancel scontrol slurmctld slurmd munged mungekey; do
    command -v "$c" >/dev/null 2>&1 || skip "$c is not installed (apt-get install slurm-wlm munge)"
done
case $ps in /*) ;; *) ps=$(pwd)/$ps ;; esac

# munged wants its socket's directory, and every one above it, open to all
# for search (mode --x); mktemp -d made $tmp 0700.
chmod 711 "$tmp"
mkdir -m 700 "$tmp/munge" "$tmp/state" "$tmp/spool" "$tmp/log"
mkdir -m 755 "$tmp/run"
export SLURM_CONF="$tmp/slurm.conf"

stop_daemons() {
    # jobs first (a timeout may leave some running), then the daemons, each by its pid file
    if [ -f "$tmp/run/slurmctld.pid" ]; then
        scancel --quiet --full --user=root >/dev/null 2>&1
        i=0
        while [ $i -lt 10 ] && [ -n "$(squeue -h -o %i 2>/dev/null)" ]; do sleep 1; i=$((i + 1)); done
    fi
    for d in slurmd slurmctld munged; do
        [ -f "$tmp/run/$d.pid" ] || continue
        pid=$(cat "$tmp/run/$d.pid")
        kill "$pid" 2>/dev/null || continue
        i=0
        while [ $i -lt 20 ] && kill -0 "$pid" 2>/dev/null; do sleep 0.5; i=$((i + 1)); done
        kill -9 "$pid" 2>/dev/null
    done
}
trap 'stop_daemons; rm -rf "$tmp"' EXIT
trap 'exit 1' INT TERM HUP

free_port() { "$py" -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])'; }
ctld_port=$(free_port)
d_port=$(free_port)
while [ "$d_port" = "$ctld_port" ]; do d_port=$(free_port); done
host=$(hostname -s)

mungekey --create --keyfile="$tmp/munge/munge.key" >"$tmp/log/mungekey.log" 2>&1 ||
    skip "mungekey could not make a key: $(tail -n 1 "$tmp/log/mungekey.log")"
munged --socket="$tmp/run/munge.sock" --key-file="$tmp/munge/munge.key" --pid-file="$tmp/run/munged.pid" \
    --log-file="$tmp/log/munged.log" --seed-file="$tmp/munge/seed" >"$tmp/log/munged.out" 2>&1 ||
    skip "munged did not start: $(tail -n 1 "$tmp/log/munged.out")"

cat >"$SLURM_CONF" <<EOF
ClusterName=plantsieve-test
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$ctld_port
SlurmdPort=$d_port
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$tmp/run/munge.sock
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
DependencyParameters=kill_invalid_depend
MpiDefault=none
MailProg=/bin/true
ReturnToService=2
StateSaveLocation=$tmp/state
SlurmdSpoolDir=$tmp/spool
SlurmctldPidFile=$tmp/run/slurmctld.pid
SlurmdPidFile=$tmp/run/slurmd.pid
SlurmctldLogFile=$tmp/log/slurmctld.log
SlurmdLogFile=$tmp/log/slurmd.log
NodeName=$host NodeAddr=127.0.0.1 CPUs=$(nproc) State=UNKNOWN
PartitionName=test Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
slurmctld -f "$SLURM_CONF" >"$tmp/log/slurmctld.out" 2>&1 ||
    skip "slurmctld did not start: $(tail -n 1 "$tmp/log/slurmctld.out")"
slurmd -f "$SLURM_CONF" >"$tmp/log/slurmd.out" 2>&1 ||
    skip "slurmd did not start: $(tail -n 1 "$tmp/log/slurmd.out")"
t0=$(date +%s)
until [ "$(sinfo -h -n "$host" -o %t 2>/dev/null)" = idle ]; do
    if [ $(($(date +%s) - t0)) -ge 60 ]; then
        skip "the node did not come up idle within 60 s (state: $(sinfo -h -n "$host" -o '%t %E' 2>&1 | tail -n 1))"
    fi
    sleep 1
done
echo "note: munged, slurmctld and slurmd up in $(($(date +%s) - t0)) s (Slurm $(sinfo -V | cut -d' ' -f2))"

normal() { sed 's/plantsieve \(screen\|merge\) [^"<`]*/CMD/g' "$1"; }
mkdir "$tmp/work"
cd "$tmp/work" || exit 1
cp "$src/catalogs/demo-variants.yaml" "$src/tests/data/e2e/families.yaml" .
set -- demo-variants.yaml families.yaml
"$ps" screen --quiet -o out "$@" >single.out 2>single.err
want=$?
mv out single

# the documented scripts, as they are; what they take from the environment is given to sbatch
export PLANTSIEVE="$ps" CATALOGS="$*" N=4 PARTS=parts OUT=out RC_FILE=merge.rc
t1=$(date +%s)
array=$(sbatch --parsable --export=ALL --array=1-4 -o 'shard-%a.log' "$src/docs/slurm/shard-array.sbatch" 2>sbatch.err)
check "sbatch took the job array" 0 $?
array=${array%%;*}
merge=$(sbatch --parsable --export=ALL --dependency="afterok:$array" -o merged.out -e merged.err \
    "$src/docs/slurm/merge.sbatch" 2>>sbatch.err)
check "sbatch took the merge job" 0 $?
merge=${merge%%;*}
[ -z "$array" ] || [ -z "$merge" ] && sed 's/^/    /' sbatch.err
# every job has left the queue once the merge has run, or was cancelled because a shard
# failed (kill_invalid_depend)
until [ -z "$(squeue -h -o %i 2>/dev/null)" ]; do
    if [ $(($(date +%s) - t1)) -ge 300 ]; then
        echo "FAIL: the jobs are not done after 300 s:"
        squeue | sed 's/^/    /'
        fail=$((fail + 1))
        break
    fi
    sleep 1
done
echo "note: the array and the merge ran in $(($(date +%s) - t1)) s"
n_parts=$(ls parts/*.partial 2>/dev/null | wc -l)
check "4 partial results" 4 "$n_parts"
if [ "$n_parts" != 4 ]; then
    for k in 1 2 3 4; do echo "shard $k said:"; sed 's/^/    /' "shard-$k.log" 2>/dev/null; done
fi
if [ -f merge.rc ]; then
    check "merge exit code as the single run's" "$want" "$(cat merge.rc)"
else
    fail=$((fail + 1))
    echo "FAIL: the merge job did not run (no merge.rc)"
    scontrol show job "$merge" 2>&1 | grep -E 'JobState|Reason' | sed 's/^/    /'
fi
[ -s merged.err ] && { echo "the merge said on stderr:"; sed 's/^/    /' merged.err; }
normal single.out >o.a
normal merged.out >o.b 2>/dev/null
if cmp -s o.a o.b; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: the listing differs"; diff o.a o.b | head | cut -c1-200; fi
(cd single && find . -type f | sort) >l.a
if [ -d out ]; then
    (cd out && find . -type f | sort) >l.b
    check "the same report files" 0 "$(cmp -s l.a l.b && [ -s l.a ] && echo 0 || echo 1)"
    while read -r f; do
        normal "single/$f" >n.a
        normal "out/$f" >n.b 2>/dev/null
        if cmp -s n.a n.b; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: $f differs"; diff n.a n.b | head -5 | cut -c1-200; fi
    done <l.a
else
    fail=$((fail + 1))
    echo "FAIL: the merge wrote no report set (no directory out)"
fi
echo "shard_slurm.sh: $pass passed, $fail failed ($(wc -l <l.a) report files compared, single run exit $want)"
[ "$fail" -eq 0 ]
