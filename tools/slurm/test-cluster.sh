#!/usr/bin/env bash
# Test of tools/slurm on a real single-node Slurm cluster started here on localhost.
#
#   tools/slurm/test-cluster.sh --selftest            cluster check with a plain array + merge job
#   tools/slurm/test-cluster.sh AXICORE CASE -- SWEEP_ARGS…
#                                                      4-shard sweep through submit.sh, compared
#                                                      byte for byte with an unsharded run
#
# Needs root (as CI runs). Installs Debian's slurm-wlm and munge if missing, starts munged,
# slurmctld and slurmd directly (no systemd) with every file — munge key copy and socket,
# slurm.conf, state, spool, logs, pid files — under one temporary directory, and stops the
# daemons it started, by their pid files, on every exit. Each wait has a time limit.
# JOB_TIMEOUT=SECONDS bounds the wait for the jobs (default 120 for --selftest, 1800 for a sweep).
# DEMAG_ARGS="…" (with a sweep) also runs the demagnetization study with these options in 4
# shards (submit.sh --demag) and compares the merge with the unsharded study.
# KEEP_LOGS=DIR keeps the daemons' logs, the generated slurm.conf and the job files there.
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
say() { printf 'test-cluster: %s\n' "$*" >&2; }
die() { say "FAILED: $*"; exit 1; }
usage() { echo "usage: $0 --selftest | $0 AXICORE CASE -- SWEEP_ARGS..." >&2; exit 2; }

mode=
if [ "${1:-}" = --selftest ]; then
    mode=selftest; shift; [ $# -eq 0 ] || usage
elif [ $# -ge 2 ]; then
    mode=sweep; axicore=$1 case_file=$2; shift 2
    if [ $# -gt 0 ]; then [ "$1" = -- ] || usage; shift; fi
    [ -x "$axicore" ] || die "$axicore is not an executable"
    [ -f "$case_file" ] || die "case file $case_file not found"
    axicore=$(cd "$(dirname "$axicore")" && pwd)/$(basename "$axicore")
    case_file=$(cd "$(dirname "$case_file")" && pwd)/$(basename "$case_file")
else
    usage
fi
[ "$(id -u)" -eq 0 ] || die "must run as root (it installs packages and starts slurmd)"
[ "$mode" = sweep ] && [ $# -eq 0 ] && die "no sweep options after --"

t0=$(date +%s)
elapsed() { echo "$(( $(date +%s) - t0 )) s"; }
# wait_for SECONDS WHAT COMMAND…: poll COMMAND every half second until it succeeds.
wait_for() {
    local limit=$1 what=$2; shift 2
    local end=$(( $(date +%s) + limit ))
    until "$@" > /dev/null 2>&1; do
        [ "$(date +%s)" -lt "$end" ] || return 1
        sleep 0.5
    done
    say "$what ($(elapsed))"
}

# --- packages ---------------------------------------------------------------------------
if ! command -v slurmctld > /dev/null || ! command -v slurmd > /dev/null ||
   ! command -v sbatch > /dev/null || ! command -v munged > /dev/null; then
    say "installing slurm-wlm and munge from Debian's packages"
    export DEBIAN_FRONTEND=noninteractive
    timeout 600 apt-get update -qq || die "apt-get update"
    timeout 900 apt-get install -y -qq slurm-wlm munge > /dev/null || die "apt-get install slurm-wlm munge"
fi
say "slurm $(slurmctld -V | awk '{print $2}'), munge $(munged -V | awk '{print $1}' | cut -d- -f2) ($(elapsed))"

# --- one temporary directory for everything -----------------------------------------------
tmp=$(mktemp -d /tmp/axicore-slurm.XXXXXX)
chmod 755 "$tmp"
mkdir -p "$tmp/munge" "$tmp/state" "$tmp/spool" "$tmp/log" "$tmp/run" "$tmp/jobs"
chmod 755 "$tmp/munge" # munged wants its socket directory searchable by all
pids=("$tmp/run/slurmd.pid" "$tmp/run/slurmctld.pid" "$tmp/run/munged.pid")
cleanup() {
    local status=$?
    set +e
    for f in "${pids[@]}"; do
        [ -s "$f" ] || continue
        local pid; pid=$(cat "$f")
        kill "$pid" 2> /dev/null || continue
        for _ in $(seq 40); do kill -0 "$pid" 2> /dev/null || break; sleep 0.25; done
        kill -0 "$pid" 2> /dev/null && { say "$(basename "$f" .pid) did not stop; killing pid $pid"; kill -9 "$pid"; }
    done
    if [ "$status" -ne 0 ]; then
        for l in "$tmp"/log/*.log; do
            [ -s "$l" ] && { say "last lines of $(basename "$l"):"; tail -n 15 "$l" >&2; }
        done
        for l in "$tmp"/jobs/*/slurm-*.out "$tmp"/jobs/slurm-*.out; do
            [ -s "$l" ] && { say "job log $(basename "$l"):"; tail -n 15 "$l" >&2; }
        done
    fi
    if [ -n "${KEEP_LOGS:-}" ]; then
        mkdir -p "$KEEP_LOGS" && cp -r "$tmp/log" "$tmp/slurm.conf" "$tmp/jobs" "$KEEP_LOGS"/ 2> /dev/null
    fi
    rm -rf "$tmp"
    exit "$status"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

# --- munge: a key of our own (generated if the package left none) -----------------------
if [ -s /etc/munge/munge.key ]; then
    cp /etc/munge/munge.key "$tmp/munge/munge.key"
else
    dd if=/dev/urandom of="$tmp/munge/munge.key" bs=1 count=1024 status=none
fi
chmod 600 "$tmp/munge/munge.key"
socket=$tmp/munge/munge.socket
# --force: munged otherwise refuses to run as root and to trust a socket under /tmp.
munged --force --key-file="$tmp/munge/munge.key" --socket="$socket" \
    --pid-file="${pids[2]}" --log-file="$tmp/log/munged.log" --seed-file="$tmp/munge/seed" \
    || die "munged did not start"
wait_for 20 "munged is up" sh -c "munge -S '$socket' -n | unmunge -S '$socket'" \
    || die "munged does not answer on $socket within 20 s"

# --- slurm.conf ---------------------------------------------------------------------------
# The node keeps the machine's short host name (slurmd looks itself up by it) but every
# address is 127.0.0.1: nothing depends on name resolution and no traffic leaves loopback.
node=$(hostname -s)
cpus=$(nproc)
mem=$(awk '/^MemTotal:/ {print int($2 / 1024 * 0.9)}' /proc/meminfo) # MiB, with a margin
conf=$tmp/slurm.conf
cat > "$conf" << CONF
# Generated by tools/slurm/test-cluster.sh: one node, no accounting, no cgroups.
ClusterName=axicoretest
SlurmctldHost=$node(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$socket
SlurmctldPort=$((20000 + RANDOM % 20000))
SlurmdPort=$((40000 + RANDOM % 20000))
StateSaveLocation=$tmp/state
SlurmdSpoolDir=$tmp/spool
SlurmctldPidFile=${pids[1]}
SlurmdPidFile=${pids[0]}
SlurmctldLogFile=$tmp/log/slurmctld.log
SlurmdLogFile=$tmp/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/backfill
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
MailProg=/bin/true
MpiDefault=none
ReturnToService=2
SlurmctldTimeout=30
SlurmdTimeout=30
InactiveLimit=0
MinJobAge=300
KillWait=5
Waittime=0
NodeName=$node NodeAddr=127.0.0.1 NodeHostname=$node CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=$node Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF=$conf

# --- daemons --------------------------------------------------------------------------------
slurmctld -f "$conf" -i || die "slurmctld did not start"
wait_for 30 "slurmctld answers" scontrol ping || die "slurmctld does not answer within 30 s"
slurmd -f "$conf" -N "$node" || die "slurmd did not start"
node_idle() { [ "$(sinfo -h -n "$node" -o '%T' | tr -d '*')" = idle ]; }
wait_for 60 "node $node is idle with $cpus CPUs" node_idle \
    || die "node $node not idle within 60 s (state: $(sinfo -h -n "$node" -o '%T %E' 2>&1))"

# --- jobs ---------------------------------------------------------------------------------
# run_limited SECONDS COMMAND…: a time limit on a job wait, with scancel of our jobs if it hits.
run_limited() {
    local limit=$1; shift
    local status=0
    timeout "$limit" "$@" || status=$?
    if [ "$status" -eq 124 ]; then
        local queue; queue=$(squeue -h -o '%i %T %r' 2>&1 | tr '\n' ';')
        scancel --user=root 2> /dev/null || true
        die "jobs did not finish within $limit s (queue: $queue)"
    fi
    return "$status"
}

if [ "$mode" = selftest ]; then
    # A plain array of 4 tasks, one file each, and a merge that depends on it: the same job
    # shape as the sweep (1-based task ids, afterok dependency, sbatch --wait).
    work=$tmp/jobs
    cat > "$work/task.sbatch" << 'JOB'
#!/usr/bin/env bash
set -eu
printf 'task %s of %s on %s\n' "$SLURM_ARRAY_TASK_ID" "$SLURM_ARRAY_TASK_COUNT" "$SLURMD_NODENAME" \
    > "$OUT_DIR/part-$SLURM_ARRAY_TASK_ID.txt"
JOB
    cat > "$work/merge.sbatch" << 'JOB'
#!/usr/bin/env bash
set -eu
for k in 1 2 3 4; do cat "$OUT_DIR/part-$k.txt"; done > "$OUT_DIR/all.txt"
JOB
    export OUT_DIR=$work
    array=$(sbatch --parsable --export=ALL --array=1-4 --output="$work/slurm-%A_%a.out" "$work/task.sbatch") \
        || die "sbatch of the array job"
    say "array job $array submitted"
    merge=$(run_limited "${JOB_TIMEOUT:-120}" sbatch --parsable --export=ALL --wait --dependency="afterok:${array%%;*}" \
        --kill-on-invalid-dep=yes --output="$work/slurm-%j-merge.out" "$work/merge.sbatch") \
        || die "the merge job failed"
    # sbatch --wait exits 0 for a job cancelled before it started (as a merge is when a task
    # fails), so every state is read back: four tasks and the merge, all COMPLETED.
    states=$(scontrol show job "${array%%;*}" -o; scontrol show job "${merge%%;*}" -o)
    states=$(grep -o 'JobState=[A-Z_]*' <<< "$states" | sort | uniq -c | tr -s ' ' | tr '\n' ';')
    [ "$states" = " 5 JobState=COMPLETED;" ] || die "job states: $states (want 5 COMPLETED)"
    say "merge job done, all 5 jobs COMPLETED ($(elapsed))"
    for k in 1 2 3 4; do printf 'task %s of 4 on %s\n' "$k" "$node"; done > "$work/expected.txt"
    cmp "$work/expected.txt" "$work/all.txt" || { diff "$work/expected.txt" "$work/all.txt" >&2 || true; die "merged output differs"; }
    say "self-test passed: 4 array tasks and the dependent merge wrote the expected file ($(elapsed))"
    echo "1 passed, 0 failed"
else
    work=$tmp/jobs/sweep
    mkdir -p "$work"
    # Exit code 5 (some points failed, their rows say why) is a finished sweep: accepted when the
    # sharded and the unsharded runs both give it, and their files are then compared as well.
    sharded=0
    run_limited "${JOB_TIMEOUT:-1800}" "$here/submit.sh" --wait --shards 4 --axicore "$axicore" "$case_file" "$work" -- "$@" \
        || sharded=$?
    [ "$sharded" -eq 0 ] || [ "$sharded" -eq 5 ] || die "the sharded sweep failed (exit $sharded)"
    say "sharded sweep done, exit $sharded ($(elapsed)); unsharded reference run"
    unsharded=0
    "$axicore" sweep "$case_file" "$@" --out "$tmp/jobs/unsharded.csv" || unsharded=$?
    [ "$unsharded" -eq 0 ] || [ "$unsharded" -eq 5 ] || die "the unsharded sweep failed (exit $unsharded)"
    [ "$sharded" -eq "$unsharded" ] || die "exit codes differ: sharded $sharded, unsharded $unsharded"
    cmp "$tmp/jobs/unsharded.csv" "$work/sweep.csv" || die "merged CSV differs from the unsharded run"
    say "sweep test passed: 4 shards merged on Slurm equal the unsharded run byte for byte ($(wc -l < "$work/sweep.csv") lines, $(elapsed))"
    if [ -n "${DEMAG_ARGS:-}" ]; then
        # The demagnetization study on the same cluster: 4 shards through submit.sh --demag,
        # merged, against the unsharded study.
        dwork=$tmp/jobs/demag
        # shellcheck disable=SC2086
        run_limited "${JOB_TIMEOUT:-1800}" "$here/submit.sh" --demag --wait --shards 4 --axicore "$axicore" "$dwork" -- $DEMAG_ARGS \
            || die "the sharded demagnetization study failed"
        say "sharded demagnetization study done ($(elapsed)); unsharded reference run"
        # shellcheck disable=SC2086
        "$axicore" demag $DEMAG_ARGS --out "$tmp/jobs/demag-unsharded.csv" > /dev/null \
            || die "the unsharded demagnetization study failed"
        cmp "$tmp/jobs/demag-unsharded.csv" "$dwork/sweep.csv" || die "merged demagnetization study differs from the unsharded run"
        say "demag test passed: 4 shards merged on Slurm equal the unsharded study byte for byte ($(elapsed))"
    fi
    echo "1 passed, 0 failed"
fi
