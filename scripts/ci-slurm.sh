#!/usr/bin/env bash
# CI: a single-node Slurm cluster in this container (munge, slurmctld,
# slurmd; no systemd, no cgroups), the job array of scripts/slurm-scan.sh
# over a small grid, `scan merge`, and a byte-for-byte comparison with a
# single-process run. Stops only the daemons it started, by PID.
#
#   scripts/ci-slurm.sh PATH/TO/wallflower
#
# Needs root (it installs Debian's slurm-wlm and munge when missing). The
# configuration and spool folders live in a temporary folder, so an
# existing /etc/slurm is left alone; SLURMCTLD_PORT / SLURMD_PORT choose
# other ports if 6817 / 6818 are taken.
set -euo pipefail
cd "$(dirname "$0")/.."
repo="$(pwd)"
bin="$(realpath "${1:?usage: scripts/ci-slurm.sh PATH/TO/wallflower}")"
budget="${SLURM_CI_TIMEOUT:-90}"

if ! command -v slurmctld >/dev/null 2>&1 || ! command -v munged >/dev/null 2>&1; then
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends slurm-wlm munge >/dev/null
fi

work="$(mktemp -d /tmp/wallflower-slurm.XXXXXX)"
chmod 755 "$work"
started=()
cleanup() {
    local status=$?
    for pid in "${started[@]}"; do
        kill "$pid" 2>/dev/null || true
    done
    for pid in "${started[@]}"; do
        # Wait for our own children; munged is not one, so poll it.
        for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    done
    if [ "$status" -ne 0 ]; then
        echo "== slurm logs" >&2
        tail -n 20 "$work"/*.log 2>/dev/null >&2 || true
    fi
    rm -rf "$work"
    exit "$status"
}
trap cleanup EXIT

wait_for() { # SECONDS DESCRIPTION COMMAND...
    local limit=$1 what=$2
    shift 2
    for _ in $(seq $((limit * 10))); do
        if "$@" >/dev/null 2>&1; then return 0; fi
        sleep 0.1
    done
    echo "ci-slurm: timed out waiting for $what" >&2
    return 1
}

# 1. munge (reused if one already answers).
if ! (munge -n | unmunge) >/dev/null 2>&1; then
    install -d -o munge -g munge -m 0755 /run/munge
    rm -f /run/munge/munged.pid # stale: nothing answers
    su -s /bin/sh munge -c "/usr/sbin/munged --force --pid-file=/run/munge/munged.pid"
    wait_for 10 "munged's pid file" test -s /run/munge/munged.pid
    started+=("$(cat /run/munge/munged.pid)")
    wait_for 10 "munge" sh -c 'munge -n | unmunge'
fi

# 2. Configuration and spool folders of our own.
host="$(hostname -s)"
cpus="$(nproc)"
install -d -o slurm -g slurm "$work/ctld" "$work/log"
install -d "$work/d"
export SLURM_CONF="$work/slurm.conf"
cat >"$SLURM_CONF" <<EOF
ClusterName=ci
SlurmctldHost=$host(127.0.0.1)
AuthType=auth/munge
CredType=cred/munge
SlurmUser=slurm
SlurmdUser=root
SlurmctldPort=${SLURMCTLD_PORT:-6817}
SlurmdPort=${SLURMD_PORT:-6818}
StateSaveLocation=$work/ctld
SlurmdSpoolDir=$work/d
SlurmctldPidFile=$work/slurmctld.pid
SlurmdPidFile=$work/slurmd.pid
SlurmctldLogFile=$work/log/slurmctld.log
SlurmdLogFile=$work/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SwitchType=switch/none
MpiDefault=none
MailProg=/bin/true
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
SchedulerType=sched/backfill
MinJobAge=300
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus State=UNKNOWN
PartitionName=debug Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
chmod 644 "$SLURM_CONF"

# 3. The controller, then the node daemon.
slurmctld -D -i -f "$SLURM_CONF" >"$work/slurmctld.log" 2>&1 &
started+=("$!")
wait_for 30 "slurmctld" sh -c 'scontrol ping | grep -q UP'
slurmd -D -f "$SLURM_CONF" >"$work/slurmd.log" 2>&1 &
started+=("$!")
wait_for 30 "an idle node" sh -c 'sinfo -h -o %t | grep -q idle'

# 4. The array: three shares of a small map.
scan=(--curve "y^2 = z^3 - 3 z + u" --set u=0 --param u --re -3..3 --im -2..2 --grid 6x5 --reach 12)
jobs="$work/jobs"
mkdir -p "$jobs"
job="$(sbatch --parsable --array=1-3 --cpus-per-task=1 --chdir="$jobs" \
    --output="$work/log/task-%a.log" --export=ALL,WALLFLOWER="$bin",PARTS="$jobs/parts" \
    "$repo/scripts/slurm-scan.sh" "${scan[@]}")"
job="${job%%;*}"
echo "ci-slurm: submitted array job $job"
wait_for "$budget" "array job $job" sh -c "[ -z \"\$(squeue -h -j $job 2>/dev/null)\" ]"
for k in 1 2 3; do
    test -s "$jobs/parts/part-$k.jsonl" || { echo "ci-slurm: share $k missing" >&2; cat "$work/log/task-$k.log" >&2 || true; exit 1; }
done

# 5. Merge and compare with one process.
"$bin" scan merge "$jobs/parts" -o "$work/merged.jsonl"
"$bin" scan "${scan[@]}" -o "$work/single.jsonl"
if cmp "$work/merged.jsonl" "$work/single.jsonl"; then
    echo "ci-slurm: the merged array output equals the single run ($(wc -l <"$work/single.jsonl") points)"
else
    echo "ci-slurm: the merged array output differs from the single run" >&2
    exit 1
fi
