#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Proves scripts/slurm/umbra-array.sbatch on one machine: starts a private one-node Slurm
# cluster (munged, slurmctld, slurmd from a configuration written to a temporary folder, on
# free ports), submits the job array over a manifest of small simulated captures, waits (time
# limit), checks that every output is byte-identical to a local `umbra-cli batch` run, stops
# the daemons it started and exits 0. Installs slurm-wlm and munge from Debian when missing
# (apt-get as root, or with sudo). Cleans up on failure too.
#
#   scripts/slurm-selftest.sh            # uses build/bin/umbra-cli (UMBRA_CLI overrides)
# Environment: UMBRA_SLURM_TIMEOUT_S (default 300) bounds each wait.
set -euo pipefail
ROOT=$(cd "$(dirname "$0")/.." && pwd)
CLI=${UMBRA_CLI:-$ROOT/build/bin/umbra-cli}
TIMEOUT_S=${UMBRA_SLURM_TIMEOUT_S:-300}
TASKS=3      # array size: fewer tasks than captures, so a shard holds several
CAPTURES=5

say() { echo "slurm-selftest: $*"; }
die() { echo "slurm-selftest: FAILED: $*" >&2; exit 1; }

[ -x "$CLI" ] || die "$CLI not found; build it first (cmake --build build --target umbra-cli)"

# ---------------------------------------------------------------- packages
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v sbatch >/dev/null \
   || ! command -v munged >/dev/null; then
  SUDO=""
  [ "$(id -u)" -eq 0 ] || SUDO="sudo"
  say "installing slurm-wlm and munge from Debian"
  export DEBIAN_FRONTEND=noninteractive
  $SUDO apt-get update -q
  $SUDO apt-get install -y -q --no-install-recommends slurm-wlm munge
fi

# ---------------------------------------------------------------- private cluster
T=$(mktemp -d /tmp/umbra-slurm-selftest.XXXXXX)
chmod 755 "$T"
PIDS=()
JOB=""
cleanup() {
  local rc=$?
  set +e
  if [ -n "$JOB" ] && [ -n "${SLURM_CONF:-}" ]; then
    # Cancel the array and let slurmd end its tasks before the daemons stop.
    scancel "$JOB" 2>/dev/null
    for _ in $(seq 30); do [ -z "$(squeue -h -j "$JOB" 2>/dev/null)" ] && break; sleep 0.5; done
  fi
  # Stop only the daemons this script started, newest first, and wait for them.
  for ((i = ${#PIDS[@]} - 1; i >= 0; i--)); do kill "${PIDS[i]}" 2>/dev/null; done
  for pid in "${PIDS[@]}"; do
    for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$pid" 2>/dev/null
    wait "$pid" 2>/dev/null
  done
  if [ "$rc" -ne 0 ]; then
    for log in "$T"/slurmctld.log "$T"/slurmd.log "$T"/munged.log "$T"/logs/*.log; do
      [ -f "$log" ] && { echo "---- $log (last lines)"; tail -n 30 "$log"; }
    done
  fi
  rm -rf "$T"
  exit "$rc"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

free_port() {
  /usr/bin/python3 -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])'
}

USER_NAME=$(id -un)
NODE=$(hostname -s)
CPUS=$(nproc)
mkdir -p "$T/munge" "$T/state" "$T/spool" "$T/logs" "$T/captures"
chmod 700 "$T/munge"
dd if=/dev/urandom of="$T/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$T/munge/munge.key"
SOCKET=$T/munge/munge.socket
munged --foreground --force --socket="$SOCKET" --key-file="$T/munge/munge.key" --pid-file="$T/munge/munged.pid" \
       --log-file="$T/munged.log" --seed-file="$T/munge/munged.seed" >"$T/munged.out" 2>&1 &
PIDS+=($!)

CTLD_PORT=$(free_port)
SLURMD_PORT=$(free_port)
while [ "$SLURMD_PORT" = "$CTLD_PORT" ]; do SLURMD_PORT=$(free_port); done
export SLURM_CONF=$T/slurm.conf
cat >"$SLURM_CONF" <<EOF
# One-node cluster for scripts/slurm-selftest.sh (temporary).
ClusterName=umbraselftest
SlurmctldHost=$NODE(127.0.0.1)
SlurmUser=$USER_NAME
SlurmdUser=$USER_NAME
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$SOCKET
StateSaveLocation=$T/state
SlurmdSpoolDir=$T/spool
SlurmctldPidFile=$T/slurmctld.pid
SlurmdPidFile=$T/slurmd.pid
SlurmctldLogFile=$T/slurmctld.log
SlurmdLogFile=$T/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
MpiDefault=none
ReturnToService=2
SlurmdTimeout=60
PlugStackConfig=$T/plugstack.conf
NodeName=$NODE NodeAddr=127.0.0.1 CPUs=$CPUS State=UNKNOWN
PartitionName=selftest Nodes=$NODE Default=YES MaxTime=INFINITE State=UP
EOF
: >"$T/plugstack.conf"

for _ in $(seq 50); do [ -S "$SOCKET" ] && break; sleep 0.1; done
[ -S "$SOCKET" ] || die "munged did not start"
slurmctld -D -f "$SLURM_CONF" >"$T/slurmctld.out" 2>&1 &
PIDS+=($!)
slurmd -D -f "$SLURM_CONF" -N "$NODE" >"$T/slurmd.out" 2>&1 &
PIDS+=($!)

deadline=$((SECONDS + TIMEOUT_S))
until [ "$(sinfo -h -n "$NODE" -o %T 2>/dev/null | head -n1)" = "idle" ]; do
  [ $SECONDS -lt $deadline ] || die "the node did not become idle within ${TIMEOUT_S} s ($(sinfo 2>&1 | tail -n +2))"
  for pid in "${PIDS[@]}"; do kill -0 "$pid" 2>/dev/null || die "a daemon exited (pid $pid)"; done
  sleep 0.5
done
say "cluster up: node $NODE ($CPUS CPUs), slurmctld port $CTLD_PORT, slurmd port $SLURMD_PORT"

# ---------------------------------------------------------------- captures and manifest
SCENE=$ROOT/tests/app/fixtures/small_block_scene.json  # small synthetic block, quick to simulate
list=""
for i in $(seq 1 $CAPTURES); do
  "$CLI" simulate "$SCENE" -o "$T/captures/block$i.h5" --seed "$i" --quiet
  list+="${list:+, }\"captures/block$i.h5\""
done
cat >"$T/manifest.json" <<EOF
{ "captures": [ $list ], "settings": [ "das.f_number=1.5" ], "grid_mm": "-3:3:0:8:0.1", "png": true }
EOF

# ---------------------------------------------------------------- the array
# run_array EXPECT: submits the array, waits, checks each task's summary; EXPECT "done" wants
# every capture made, "up to date" every capture skipped (a re-submission resumes).
run_array() {
  JOB=$(UMBRA_CLI=$CLI sbatch --parsable --array=1-$TASKS --cpus-per-task=1 --mem-per-cpu=0 --time=00:10:00 \
        --chdir="$T" --output="$T/logs/%A_%a.log" "$ROOT/scripts/slurm/umbra-array.sbatch" "$T/manifest.json" "$T/cluster")
  JOB=${JOB%%;*}
  say "submitted job array $JOB ($TASKS tasks over $CAPTURES captures)"
  while [ -n "$(squeue -h -j "$JOB" 2>/dev/null)" ]; do
    [ $SECONDS -lt $deadline ] || die "job $JOB did not finish within ${TIMEOUT_S} s: $(squeue -j "$JOB")"
    sleep 1
  done
  for i in $(seq 1 $TASKS); do
    s=$T/cluster/summary-$i-of-$TASKS.json
    [ -f "$s" ] || die "task $i wrote no summary (log: $(cat "$T"/logs/"${JOB}"_*.log 2>/dev/null))"
    /usr/bin/python3 - "$s" "$1" "$i" <<'EOF' || die "summary $s: not every capture $1"
import json, sys
s = json.load(open(sys.argv[1]))
c, want, shard = s["counts"], sys.argv[2], int(sys.argv[3])
print(f"slurm-selftest: shard {s['shard']['index']}/{s['shard']['count']}: {c['done']} done, "
      f"{c['up_to_date']} up to date, {c['failed']} failed")
ok = c["total"] > 0 and c["failed"] == 0 and c["done" if want == "done" else "up_to_date"] == c["total"]
ok = ok and s["shard"]["index"] == shard and [e["index"] % s["shard"]["count"] for e in s["captures"]] == [shard - 1] * c["total"]
sys.exit(0 if ok else 1)
EOF
  done
}
run_array done
JOB=""

# ---------------------------------------------------------------- local run, byte comparison
"$CLI" batch "$T/manifest.json" --out "$T/local" 2>"$T/logs/local.log" || die "local batch run failed: $(cat "$T/logs/local.log")"
n=0
for f in "$T"/local/*.image.h5 "$T"/local/*.png; do
  b=$(basename "$f")
  cmp -s "$f" "$T/cluster/$b" || die "$b differs between the Slurm array and the local run"
  n=$((n + 1))
done
[ "$n" -eq $((2 * CAPTURES)) ] || die "expected $((2 * CAPTURES)) outputs, compared $n"
say "$n output files byte-identical between the $TASKS-task array and one local run"
# Submitting again (as after a pre-emption) skips everything already made.
run_array "up to date"
JOB=""
say "ok"
