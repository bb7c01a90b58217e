#!/usr/bin/env bash
# Start a single-node SLURM cluster (munged, slurmctld, slurmd) on this machine,
# so that tests/test_slurm.py can run the sweep through the SLURM profile.
#
# Needs root and the Debian packages slurm-wlm and munge. Safe to run again:
# daemons that already answer are left running; a changed slurm.conf restarts
# the SLURM daemons. Stop everything with tests/cluster/stop_slurm.sh.
#
# Environment (all optional):
#   SLURM_PARTITION   partition name            [bscheck]
# The partition's name is one no profile assumes, so that a profile naming a
# partition fails here as it would on any other cluster.
#   SLURM_WAIT        seconds to wait per step  [60]
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
# shellcheck source=tests/cluster/common.sh
source "$here/common.sh"

partition="${SLURM_PARTITION:-bscheck}"
wait_s="${SLURM_WAIT:-60}"

[[ $EUID -eq 0 ]] || die "must run as root (munged and slurmd are started as system daemons)"
for cmd in munged mungekey munge unmunge slurmctld slurmd sinfo srun scontrol; do
    command -v "$cmd" >/dev/null || die "'$cmd' not found: install the Debian packages slurm-wlm and munge"
done

# --- munge ---------------------------------------------------------------
if [[ ! -s $MUNGE_KEY ]]; then
    say "creating munge key $MUNGE_KEY"
    mungekey -c -k "$MUNGE_KEY"
fi
# munged refuses to start unless the key is private to its own user
chown munge:munge "$MUNGE_KEY"
chmod 0400 "$MUNGE_KEY"
install -d -o munge -g munge -m 0755 /run/munge
install -d -o munge -g munge -m 0700 /var/log/munge /var/lib/munge

if munge_ok; then
    say "munged already answering"
else
    say "starting munged as user munge"
    runuser -u munge -- munged
    wait_until "$wait_s" munge_ok || die "munged did not answer within ${wait_s}s (see /var/log/munge/munged.log)"
fi

# --- slurm.conf ----------------------------------------------------------
# slurmd -C reports exactly the hardware slurmd will see, so the node is never
# drained for claiming more CPUs or memory than it has.
hw="$(slurmd -C | head -n 1)"
node="$(sed -n 's/^NodeName=\([^ ]*\).*/\1/p' <<<"$hw")"
[[ -n $node ]] || node="$(hostname -s)"
node_hw="$(sed -e 's/^NodeName=[^ ]* //' -e 's/ *UpTime=.*//' <<<"$hw")"
if ! grep -q 'RealMemory=' <<<"$node_hw"; then
    node_hw="$node_hw RealMemory=$(awk '/^MemTotal:/ {print int($2/1024)}' /proc/meminfo)"
fi

new_conf="$(mktemp)"
trap 'rm -f "$new_conf"' EXIT
cat >"$new_conf" <<EOF
$CONF_MARKER
# Single-node test cluster for boundscape; regenerated on every start.
ClusterName=boundscape
SlurmctldHost=${node}(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
SchedulerType=sched/backfill
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
# Finished jobs stay visible to squeue this long; the executor plugin polls
# with squeue because there is no accounting database for sacct.
MinJobAge=300
ReturnToService=2
InactiveLimit=0
KillWait=10
StateSaveLocation=$STATE_DIR
SlurmdSpoolDir=$SPOOL_DIR
SlurmctldPidFile=$CTLD_PID
SlurmdPidFile=$SLURMD_PID
SlurmctldLogFile=$LOG_DIR/slurmctld.log
SlurmdLogFile=$LOG_DIR/slurmd.log
NodeName=$node NodeAddr=127.0.0.1 $node_hw State=UNKNOWN
PartitionName=$partition Nodes=$node Default=YES MaxTime=INFINITE State=UP
EOF

restart=0
if [[ -f $SLURM_CONF_PATH ]] && ! grep -qxF "$CONF_MARKER" "$SLURM_CONF_PATH"; then
    say "keeping the existing $SLURM_CONF_PATH as $SLURM_CONF_PATH.orig (not written by this script)"
    mv "$SLURM_CONF_PATH" "$SLURM_CONF_PATH.orig"
fi
if [[ -f $SLURM_CONF_PATH ]] && cmp -s "$new_conf" "$SLURM_CONF_PATH"; then
    say "slurm.conf unchanged ($SLURM_CONF_PATH)"
else
    say "writing $SLURM_CONF_PATH for node $node ($node_hw), partition $partition"
    install -d -m 0755 "$(dirname "$SLURM_CONF_PATH")"
    install -m 0644 "$new_conf" "$SLURM_CONF_PATH"
    restart=1
fi
install -d -m 0755 "$STATE_DIR" "$SPOOL_DIR" "$LOG_DIR"

if [[ $restart -eq 1 ]]; then
    stop_by_pidfile slurmd "$SLURMD_PID"
    stop_by_pidfile slurmctld "$CTLD_PID"
fi

# --- daemons -------------------------------------------------------------
if pid_alive "$CTLD_PID" slurmctld && scontrol ping 2>/dev/null | grep -q UP; then
    say "slurmctld already running (pid $(cat "$CTLD_PID"))"
else
    say "starting slurmctld"
    slurmctld
    wait_until "$wait_s" ctld_ok || die "slurmctld did not answer within ${wait_s}s (see $LOG_DIR/slurmctld.log)"
fi

if pid_alive "$SLURMD_PID" slurmd; then
    say "slurmd already running (pid $(cat "$SLURMD_PID"))"
else
    say "starting slurmd"
    slurmd
fi

say "waiting for node $node to become idle"
if ! wait_until "$wait_s" node_ready "$node"; then
    # A node left DOWN or DRAINED by an earlier, unclean stop needs a resume.
    say "node state is '$(node_state "$node")'; asking slurmctld to resume it"
    scontrol update NodeName="$node" State=RESUME 2>/dev/null || true
    wait_until "$wait_s" node_ready "$node" \
        || die "node $node not usable after $((2 * wait_s))s, state '$(node_state "$node")' (see $LOG_DIR/slurmd.log)"
fi

say "test job: srun -N1 true"
timeout "$wait_s" srun -N1 --time=1 true || die "srun -N1 true failed (see $LOG_DIR/slurmctld.log and slurmd.log)"

sinfo
say "SLURM cluster ready: node $node, partition $partition"
