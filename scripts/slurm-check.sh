#!/usr/bin/env bash
# Integration check of psibox sweep --emit slurm and psibox ensemble --emit slurm on a real, one-node
# Slurm cluster on localhost.
# Run as root on a Debian machine: bash scripts/slurm-check.sh
# It installs slurm-wlm and munge from Debian's packages if needed, starts munged, slurmctld and
# slurmd with a private configuration in a temporary folder, submits a 4-entry sweep as a job array
# plus its collect job, waits for them, and checks that every entry completed; then it submits a tiny
# truncated-Wigner ensemble as a 2-task array plus its collect job and checks that its series.csv is
# byte-identical to a local psibox ensemble of the same config. It stops the daemons it started on exit.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd)
[ "$(id -u)" -eq 0 ] || { echo "slurm-check: run as root (it starts system daemons)"; exit 2; }
if ! command -v slurmctld >/dev/null 2>&1 || ! command -v munged >/dev/null 2>&1; then
  apt-get update -qq && apt-get install -y -qq slurm-wlm munge >/dev/null
fi
[ -f dist/cli/bin.js ] || npm run build >/dev/null

WORK=$(mktemp -d /tmp/psibox-slurm-XXXXXX)
PIDS=()
cleanup() {
  local rc=$?
  for p in "${PIDS[@]:-}"; do [ -n "$p" ] && kill "$p" 2>/dev/null || true; done
  [ -f "$WORK/slurmctld.pid" ] && kill "$(cat "$WORK/slurmctld.pid")" 2>/dev/null || true
  [ -f "$WORK/slurmd.pid" ] && kill "$(cat "$WORK/slurmd.pid")" 2>/dev/null || true
  [ -f "$WORK/munged.pid" ] && kill "$(cat "$WORK/munged.pid")" 2>/dev/null || true
  # the daemons' logs stay for a failed check; a passed one leaves nothing behind
  if [ "$rc" -eq 0 ]; then sleep 1; rm -rf "$WORK"; else echo "slurm check: its daemons' logs are in $WORK" >&2; fi
}
trap cleanup EXIT

# munge: a key and a daemon with its own socket
mkdir -p "$WORK/munge"
dd if=/dev/urandom of="$WORK/munge/munge.key" bs=1024 count=1 status=none
chmod 700 "$WORK/munge"; chmod 400 "$WORK/munge/munge.key"
SOCKET="$WORK/munge/munge.socket"
munged --force --key-file="$WORK/munge/munge.key" --socket="$SOCKET" --pid-file="$WORK/munged.pid" \
  --log-file="$WORK/munged.log" --seed-file="$WORK/munge/seed"

HOST=$(hostname -s)
CPUS=$(nproc)
cat > "$WORK/slurm.conf" <<CONF
ClusterName=psiboxcheck
SlurmctldHost=$HOST
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$SOCKET
CredType=cred/munge
StateSaveLocation=$WORK/state
SlurmdSpoolDir=$WORK/spool
SlurmctldPidFile=$WORK/slurmctld.pid
SlurmdPidFile=$WORK/slurmd.pid
SlurmctldLogFile=$WORK/slurmctld.log
SlurmdLogFile=$WORK/slurmd.log
SlurmctldPort=16817
SlurmdPort=16818
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
MpiDefault=none
ReturnToService=2
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
NodeName=$HOST CPUs=$CPUS RealMemory=4000 State=UNKNOWN
PartitionName=check Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF
mkdir -p "$WORK/state" "$WORK/spool"
export SLURM_CONF="$WORK/slurm.conf"
slurmctld -f "$SLURM_CONF"
slurmd -f "$SLURM_CONF"
for _ in $(seq 1 60); do
  if sinfo -h -o "%T" 2>/dev/null | grep -qE "idle|mixed"; then break; fi
  sleep 1
done
sinfo -h -o "%T" | grep -qE "idle|mixed" || { echo "slurm-check: the node did not come up"; tail -20 "$WORK/slurmctld.log" "$WORK/slurmd.log"; exit 1; }

# wait until the jobs (a comma-separated list) have left the queue, at most 5 minutes
wait_jobs() {
  for _ in $(seq 1 300); do
    if [ -z "$(squeue -h -j "$1" 2>/dev/null)" ]; then return 0; fi
    sleep 1
  done
  echo "slurm-check: jobs $1 still queued after 5 minutes"; squeue; exit 1
}

# a 4-entry sweep of tiny runs
cd "$WORK"
cat > scan.toml <<'CFG'
[grid]
cells = [32, 32]
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "50 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.2
mode = [1, 1]
[sweep]
[sweep.values]
"particle.mass" = ["1e-22 eV", "2e-22 eV"]
"initial.contrast" = [0.1, 0.2]
[cluster]
partition = "check"
time = "00:10:00"
cpus = 1
memory = "500M"
max_parallel = 2
CFG
node "$ROOT/dist/cli/bin.js" sweep scan.toml --emit slurm
JOB=$(sbatch --parsable output/scan/sweep.sbatch)
COLLECT=$(sbatch --parsable --dependency=afterany:"$JOB" output/scan/collect.sbatch)
echo "slurm-check: submitted array $JOB and collect job $COLLECT"
wait_jobs "$JOB,$COLLECT"
[ -f output/scan/sweep-summary.csv ] || { echo "slurm-check: the collect job wrote no summary"; cat output/scan/logs/*; exit 1; }
COMPLETED=$(grep -c ",completed," output/scan/sweep-summary.csv || true)
cat output/scan/sweep-summary.csv | cut -d, -f1-4
if [ "$COMPLETED" -ne 4 ]; then
  echo "slurm-check: FAILED, $COMPLETED of 4 entries completed"
  cat output/scan/logs/* || true
  exit 1
fi
# each task's log shows its run's progress (a line at every tenth of the span)
for t in 0 1 2 3; do
  grep -q "100% step" "output/scan/logs/task-$t.err" || { echo "slurm-check: FAILED, task $t's log shows no progress"; cat output/scan/logs/* || true; exit 1; }
done
echo "slurm-check: passed, 4 of 4 entries completed through Slurm, each task's log with its progress"

# a tiny truncated-Wigner ensemble: 6 members in a 2-task array, then its collect job (reduction)
cat > wigner.toml <<'CFG'
[grid]
cells = 16
box = "10 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "100 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e6 Msun/kpc^3"
contrast = 0.1
[output]
time_unit = "Myr"
[ensemble]
members = 6
particles = 1000
samples = 2
[cluster]
partition = "check"
time = "00:05:00"
cpus = 1
memory = "500M"
max_parallel = 2
CFG
node "$ROOT/dist/cli/bin.js" ensemble wigner.toml --emit slurm -q
EJOB=$(sbatch --parsable output/wigner/ensemble/slurm/ensemble.sbatch)
ECOLLECT=$(sbatch --parsable --dependency=afterany:"$EJOB" output/wigner/ensemble/slurm/collect.sbatch)
echo "slurm-check: submitted ensemble array $EJOB and collect job $ECOLLECT"
wait_jobs "$EJOB,$ECOLLECT"
sed 's/^\[output\]/[output]\ndir = "local-wigner"/' wigner.toml > local-wigner.toml
node "$ROOT/dist/cli/bin.js" ensemble local-wigner.toml --workers 2 -q >/dev/null
if ! cmp -s output/wigner/ensemble/series.csv local-wigner/ensemble/series.csv; then
  echo "slurm-check: FAILED, the ensemble's series.csv through Slurm differs from the local run's"
  cat output/wigner/ensemble/slurm/logs/* || true
  exit 1
fi
echo "slurm-check: passed, the ensemble reduced through Slurm ($(ls output/wigner/ensemble/members | wc -l) members) equals the local run byte for byte"
