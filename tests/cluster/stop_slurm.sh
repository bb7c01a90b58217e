#!/usr/bin/env bash
# Stop the daemons that start_slurm.sh started, each by the pid in its pid file.
# Leaves slurm.conf, the munge key and the spool directories in place, so a
# later start is quick. Safe to run when nothing is running.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
# shellcheck source=tests/cluster/common.sh
source "$here/common.sh"

[[ $EUID -eq 0 ]] || die "must run as root"

stop_by_pidfile slurmd "$SLURMD_PID"
stop_by_pidfile slurmctld "$CTLD_PID"
stop_by_pidfile munged "$MUNGE_PID"
say "stopped"
