#!/usr/bin/env bash
# Submit a sharded axicore sweep to Slurm: an array of N tasks (one shard each, see
# sweep-array.sbatch) and a merge job that runs only if every task succeeded (sweep-merge.sbatch).
#
#   tools/slurm/submit.sh [--shards N] [--cpus N] [--wait] [--axicore PATH] CASE OUT_DIR -- SWEEP_ARGS…
#
# SWEEP_ARGS are the options of `axicore sweep` other than --shard and --out (--vary, --values,
# --tolerance, --jobs). The merged table is OUT_DIR/sweep.csv, the shards OUT_DIR/shard-K.csv,
# the job logs OUT_DIR/slurm-*.out. Prints "array JOBID" and "merge JOBID". With --wait it blocks
# until the merge job ends and exits with its status: 0, 5 when the merged sweep has failed
# points (as `axicore sweep` itself), other non-zero when a shard or the merge job failed.
# --cpus N asks N CPUs for each shard (default 1): match the sweep's --jobs N.
# --demag shards the demagnetization study instead (no CASE; DEMAG_ARGS are the options of
# `axicore demag` other than --shard and --out: --gamma, --chi, --bore, --tolerance, --jobs);
# render the merged OUT_DIR/sweep.csv with `axicore demag --from OUT_DIR/sweep.csv --plots DIR`.
# Other sbatch settings (partition, account, time limit) come from sbatch's own SBATCH_*
# environment variables, e.g. SBATCH_PARTITION=short.
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
usage() { echo "usage: $0 [--shards N] [--cpus N] [--wait] [--axicore PATH] CASE OUT_DIR -- SWEEP_ARGS...  or  $0 --demag [options] OUT_DIR -- DEMAG_ARGS..." >&2; exit 2; }
shards=4 cpus=1 wait=no axicore=${AXICORE:-} study=sweep
while [ $# -gt 0 ]; do
    case $1 in
        --shards) [ $# -ge 2 ] || usage; shards=$2; shift 2 ;;
        --cpus) [ $# -ge 2 ] || usage; cpus=$2; shift 2 ;;
        --wait) wait=yes; shift ;;
        --demag) study=demag; shift ;;
        --axicore) [ $# -ge 2 ] || usage; axicore=$2; shift 2 ;;
        --help|-h) usage ;;
        -*) echo "submit.sh: unknown option $1" >&2; usage ;;
        *) break ;;
    esac
done
if [ "$study" = demag ]; then
    # The demagnetization study builds its own cases from its grid options.
    [ $# -ge 1 ] || usage
    case_file= out_dir=$1; shift
else
    [ $# -ge 2 ] || usage
    case_file=$1 out_dir=$2; shift 2
fi
if [ $# -gt 0 ]; then [ "$1" = -- ] || usage; shift; fi
for n in "--shards $shards" "--cpus $cpus"; do
    case ${n#* } in ''|*[!0-9]*|0) echo "submit.sh: ${n% *} must be a positive whole number, not '${n#* }'" >&2; exit 2 ;; esac
done
command -v sbatch > /dev/null || { echo "submit.sh: sbatch not found: run this where Slurm's client commands are" >&2; exit 2; }
[ "$study" = demag ] || [ -f "$case_file" ] || { echo "submit.sh: case file $case_file not found" >&2; exit 2; }
if [ -z "$axicore" ]; then
    axicore=$(command -v axicore) || { echo "submit.sh: axicore is not on PATH; give --axicore PATH" >&2; exit 2; }
fi
[ -x "$axicore" ] || { echo "submit.sh: $axicore is not an executable" >&2; exit 2; }
for a in "$@"; do
    case $a in --shard|--shard=*|--out|--out=*) echo "submit.sh: do not pass $a; the jobs set it" >&2; exit 2 ;; esac
done
mkdir -p "$out_dir"
rm -f "$out_dir"/shard-*.csv "$out_dir"/sweep.csv
# Absolute paths: the jobs may start in another directory on another node (a shared file system
# is assumed, as for any array job writing its results).
abs() { (cd "$(dirname "$1")" && printf '%s/%s\n' "$(pwd)" "$(basename "$1")"); }
# Passed through the environment, not --export=NAME=VALUE: sweep options such as
# --values KEY=a,b,c hold commas, which --export would split.
export AXICORE CASE OUT_DIR SWEEP_ARGS STUDY
AXICORE=$(abs "$axicore") OUT_DIR=$(cd "$out_dir" && pwd) STUDY=$study
CASE=${case_file:+$(abs "$case_file")}
SWEEP_ARGS="$*"
array=$(sbatch --parsable --export=ALL --array="1-$shards" --cpus-per-task="$cpus" \
    --output="$OUT_DIR/slurm-%A_%a.out" "$here/sweep-array.sbatch")
array=${array%%;*} # --parsable prints "id;cluster" on multi-cluster set-ups
echo "array $array"
# kill-on-invalid-dep: if a shard fails, the merge is cancelled instead of waiting forever.
merge_opts=(--parsable --export=ALL --dependency="afterok:$array" --kill-on-invalid-dep=yes
    --output="$OUT_DIR/slurm-%j-merge.out")
if [ "$wait" = yes ]; then
    # sbatch --wait prints the id only when the job ends; print it as soon as it is known.
    sbatch "${merge_opts[@]}" --wait "$here/sweep-merge.sbatch" > "$OUT_DIR/.merge-job" &
    pid=$!
    trap 'kill "$pid" 2> /dev/null || true' EXIT # no waiting sbatch left behind if we are stopped
    trap 'exit 143' TERM INT
    for _ in $(seq 50); do [ -s "$OUT_DIR/.merge-job" ] && break; sleep 0.1; done
    [ -s "$OUT_DIR/.merge-job" ] && echo "merge $(cut -d';' -f1 < "$OUT_DIR/.merge-job")"
    status=0; wait "$pid" || status=$?
    merge=$(cut -d';' -f1 < "$OUT_DIR/.merge-job" 2> /dev/null || true)
    rm -f "$OUT_DIR/.merge-job"
    # sbatch --wait exits 0 for a job cancelled before it started, as the merge is when a shard
    # fails: so the job's final state is read back too (slurmctld keeps it for MinJobAge).
    state=$(scontrol show job "$merge" -o 2> /dev/null | grep -o 'JobState=[A-Z_]*' | cut -d= -f2 || true)
    if [ "$status" -ne 0 ] || { [ -n "$state" ] && [ "$state" != COMPLETED ]; } || [ ! -f "$OUT_DIR/sweep.csv" ]; then
        echo "submit.sh: the sweep failed (merge job ${merge:-?} ${state:-state unknown}, exit $status; a failed shard cancels the merge); logs in $OUT_DIR/slurm-*.out" >&2
        exit $(( status != 0 ? status : 1 ))
    fi
    echo "merged $OUT_DIR/sweep.csv"
    # The status column is "ok" or "failed: <message>" (quoted when the message has a comma).
    failed=$(tail -n +3 "$OUT_DIR/sweep.csv" | grep -c -E '(^|,)"?failed: ' || true)
    if [ "$failed" -gt 0 ]; then
        echo "submit.sh: warning: $failed points failed (their rows in $OUT_DIR/sweep.csv say why); exit code 5" >&2
        exit 5
    fi
else
    merge=$(sbatch "${merge_opts[@]}" "$here/sweep-merge.sbatch")
    echo "merge ${merge%%;*}"
fi
