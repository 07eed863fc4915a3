#!/usr/bin/env bash
# Runs the Slurm path of docs/cluster.md for real on this one machine: starts a single-node Slurm
# (slurmctld + slurmd on localhost, authenticated by munge) with a configuration written to a
# scratch folder, submits deploy/slurm-survey.sh as a four-task job array on the demo terrain and
# the merge as a job that depends on it, waits, and compares the merged survey with a
# single-machine run of the same parameters byte for byte. It stops the daemons it started.
#
#   scripts/cluster-check.sh [DIAMETER_RANGE]        default 800..2500
#
# Needs root (the daemons run as root here) and Debian's slurm-wlm and munge, which it installs
# when missing. The built binary is put on the jobs' PATH; each array task asks for one CPU and
# 2 GB, so the four tasks fit a 2-core node two at a time.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
range=${1:-800..2500}
# 1000 px tiles: the 2000 x 2000 px demo is four tiles, one per array task (the default tile
# would make it one tile, and three tasks would have nothing to do).
tile=1000
tasks=4
cargo_target=${CARGO_TARGET_DIR:-$root/target}
bin_dir=$cargo_target/release
dem=$root/demo-terrain/farside-patch.tif

if ! command -v slurmctld >/dev/null 2>&1 || ! command -v munged >/dev/null 2>&1; then
  echo "cluster-check: installing slurm-wlm and munge"
  sudo=""
  [ "$(id -u)" -eq 0 ] || sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends slurm-wlm munge >/dev/null
fi
[ "$(id -u)" -eq 0 ] || { echo "cluster-check: run as root (it starts slurmctld, slurmd and munged)" >&2; exit 1; }
(cd "$root" && cargo build --release -q -p quietbowl)

work=$(mktemp -d "${TMPDIR:-/tmp}/qb-cluster.XXXXXX")
chmod 755 "$work"
pids=()
cleanup() {
  local status=$?
  for p in "${pids[@]}"; do kill "$p" 2>/dev/null || true; done
  sleep 1
  for p in "${pids[@]}"; do kill -9 "$p" 2>/dev/null || true; done
  if ((status)); then
    echo "cluster-check: FAILED; daemon and job logs kept in $work" >&2
  else
    rm -rf "$work"
  fi
  exit "$status"
}
trap cleanup EXIT

# munge: a key and a socket of our own, so a munged already running is left alone.
mkdir -p "$work/munge"
dd if=/dev/urandom of="$work/munge/munge.key" bs=1 count=1024 status=none
chmod 700 "$work/munge"; chmod 600 "$work/munge/munge.key"
socket=$work/munge/munge.socket
munged --force --key-file="$work/munge/munge.key" --socket="$socket" \
  --pid-file="$work/munge/munged.pid" --log-file="$work/munge/munged.log" --seed-file="$work/munge/seed"
for _ in $(seq 50); do [ -f "$work/munge/munged.pid" ] && break; sleep 0.1; done
pids+=("$(cat "$work/munge/munged.pid")")

host=$(hostname -s)
mem_mb=$(awk '/MemTotal/ {print int($2 / 1024 * 0.8)}' /proc/meminfo)
cpus=$(nproc)
mkdir -p "$work/state" "$work/spool"
export SLURM_CONF=$work/slurm.conf
cat >"$SLURM_CONF" <<CONF
ClusterName=quietbowl-check
SlurmctldHost=$host
SlurmctldPort=${QB_SLURMCTLD_PORT:-16817}
SlurmdPort=${QB_SLURMD_PORT:-16818}
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$socket
StateSaveLocation=$work/state
SlurmdSpoolDir=$work/spool
SlurmctldPidFile=$work/slurmctld.pid
SlurmdPidFile=$work/slurmd.pid
SlurmctldLogFile=$work/slurmctld.log
SlurmdLogFile=$work/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU_Memory
ReturnToService=2
MpiDefault=none
JobCompType=jobcomp/none
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
NodeName=$host CPUs=$cpus RealMemory=$mem_mb State=UNKNOWN
PartitionName=check Nodes=$host Default=YES MaxTime=60 State=UP
CONF

slurmctld -i -f "$SLURM_CONF"
slurmd -f "$SLURM_CONF"
for _ in $(seq 100); do [ -f "$work/slurmctld.pid" ] && [ -f "$work/slurmd.pid" ] && break; sleep 0.2; done
pids+=("$(cat "$work/slurmd.pid")" "$(cat "$work/slurmctld.pid")")
for _ in $(seq 150); do
  sinfo -h -o %T 2>/dev/null | grep -q -E '^idle' && break
  sleep 0.2
done
sinfo -h -o %T | grep -q -E '^idle' || { echo "cluster-check: the node did not come up; see $work/slurmd.log" >&2; exit 1; }
echo "cluster-check: single-node Slurm up on $host ($cpus CPUs, $mem_mb MB)"

started=$(date +%s)
out=$work/survey
mkdir -p "$out"
jid=$(sbatch --parsable --array=1-$tasks --cpus-per-task=1 --mem=2G --time=20 \
  --export=ALL,PATH="$bin_dir:$PATH" --chdir="$work" --output="$work/task-%a.log" \
  "$root/deploy/slurm-survey.sh" "$dem" "$out" "$range" 2G "$tile")
parts=$(for k in $(seq $tasks); do printf '%s ' "$out/part-$k.json"; done)
mid=$(sbatch --parsable --dependency=afterok:"$jid" --cpus-per-task=1 --mem=2G --time=10 \
  --export=ALL,PATH="$bin_dir:$PATH" --chdir="$work" --output="$work/merge.log" \
  --wrap "quietbowl merge $parts --out $out/survey.json")
echo "cluster-check: array job $jid ($tasks tasks, diameters $range m, $tile px tiles), merge job $mid"
while squeue -h -j "$jid,$mid" 2>/dev/null | grep -q .; do sleep 1; done
state=$(scontrol show job "$mid" 2>/dev/null | grep -o 'JobState=[A-Z_]*' || true)
[ -s "$out/survey.json" ] || {
  echo "cluster-check: no merged survey ($state); task and merge logs:" >&2
  tail -n 20 "$work"/task-*.log "$work/merge.log" >&2 || true
  exit 1
}
echo "cluster-check: Slurm run done in $(( $(date +%s) - started )) s"

"$bin_dir/quietbowl" survey "$dem" --diameter "$range" --memory 2G --tile "$tile" --no-checkpoint \
  --out "$work/single.json" >/dev/null 2>&1
for k in $(seq $tasks); do
  printf 'cluster-check: task %s surveyed %s candidates\n' "$k" \
    "$(python3 -c 'import json,sys; print(len(json.load(open(sys.argv[1]))["candidates"]))' "$out/part-$k.json")"
done
if cmp "$out/survey.json" "$work/single.json"; then
  echo "cluster-check: passed: the merged survey of $tasks Slurm array tasks equals the single-machine run byte for byte ($(stat -c %s "$work/single.json") bytes)"
else
  echo "cluster-check: FAILED: the merged survey differs from the single-machine run" >&2
  exit 1
fi
