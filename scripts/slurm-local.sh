#!/usr/bin/env bash
# A single-node Slurm cluster on loopback, for tests of the grid's job-array
# script: munged, slurmctld and slurmd run as daemons with every file under a
# scratch folder, and are stopped by their process ids (no systemd needed).
#
#   scripts/slurm-local.sh start [DIR]   start, wait until the node is idle, print SLURM_CONF
#   scripts/slurm-local.sh stop [DIR]    cancel jobs, stop the daemons (slurmd, slurmctld, munged)
#   scripts/slurm-local.sh status [DIR]  print the node state
#
# DIR defaults to $HOARFROST_SLURM_DIR or /tmp/hoarfrost-slurm. Clients use
# the cluster with `export SLURM_CONF=DIR/slurm.conf` (also in DIR/env.sh).
# Ports 6817 (slurmctld) and 6818 (slurmd) on 127.0.0.1 must be free.
set -euo pipefail

CTLD_PORT=6817
SLURMD_PORT=6818
# Bounded waits, in tenths of a second.
NODE_IDLE_WAIT=300
STOP_WAIT=100

cmd=${1:-}
dir=${2:-${HOARFROST_SLURM_DIR:-/tmp/hoarfrost-slurm}}

die() { echo "slurm-local: $*" >&2; exit 1; }

need() {
  for c in "$@"; do command -v "$c" >/dev/null 2>&1 || die "'$c' not found; install Debian's slurm-wlm, slurmctld, slurmd, slurm-client and munge."; done
}

port_busy() {
  # /proc/net/tcp lists listening sockets (state 0A) with hex ports.
  local hex
  hex=$(printf '%04X' "$1")
  awk -v p=":$hex" '$4 == "0A" && $2 ~ p"$" { found = 1 } END { exit !found }' /proc/net/tcp /proc/net/tcp6 2>/dev/null
}

stop_pid() {
  local name=$1 pidfile=$2 pid i
  [ -f "$pidfile" ] || return 0
  pid=$(cat "$pidfile" 2>/dev/null || true)
  [ -n "$pid" ] || { rm -f "$pidfile"; return 0; }
  if kill -0 "$pid" 2>/dev/null; then
    kill -TERM "$pid" 2>/dev/null || true
    for ((i = 0; i < STOP_WAIT; i++)); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    if kill -0 "$pid" 2>/dev/null; then
      echo "slurm-local: $name ($pid) did not stop on TERM; sending KILL" >&2
      kill -KILL "$pid" 2>/dev/null || true
    fi
  fi
  rm -f "$pidfile"
}

do_stop() {
  if [ -f "$dir/slurm.conf" ] && [ -f "$dir/run/slurmctld.pid" ] && kill -0 "$(cat "$dir/run/slurmctld.pid")" 2>/dev/null; then
    export SLURM_CONF="$dir/slurm.conf"
    # Running steps outlive slurmd: cancel them first (only with a controller to ask, else scancel retries for long).
    scancel --quiet --user="$(id -un)" 2>/dev/null || true
  fi
  stop_pid slurmd "$dir/run/slurmd.pid"
  stop_pid slurmctld "$dir/run/slurmctld.pid"
  stop_pid munged "$dir/run/munged.pid"
  echo "slurm-local: stopped (files kept in $dir)"
}

do_start() {
  need munged mungekey slurmctld slurmd sinfo scancel
  if [ -f "$dir/run/slurmctld.pid" ] && kill -0 "$(cat "$dir/run/slurmctld.pid")" 2>/dev/null; then
    die "a cluster is already running from $dir; stop it first: $0 stop $dir"
  fi
  for p in $CTLD_PORT $SLURMD_PORT; do port_busy "$p" && die "port $p is in use; stop whatever listens there (another Slurm?) and retry."; done

  mkdir -p "$dir"/{run,log,state,spool,munge}
  # munged refuses a socket whose folders others cannot traverse (a mktemp folder is 0700).
  chmod 0711 "$dir" "$dir/munge"
  [ -f "$dir/munge/munge.key" ] || mungekey -c -k "$dir/munge/munge.key" -b 1024
  chmod 0600 "$dir/munge/munge.key"

  local user mem cpus
  user=$(id -un)
  cpus=$(nproc)
  # Half of the free memory, in MB, so the node never claims more than there is.
  mem=$(awk '/^MemAvailable:/ { printf "%d", $2 / 2048 }' /proc/meminfo)
  cat >"$dir/slurm.conf" <<EOF
# Single-node test cluster on loopback (written by scripts/slurm-local.sh).
ClusterName=hoarfrost-local
SlurmctldHost=localhost
SlurmUser=$user
SlurmdUser=$user
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$dir/munge/munge.socket
CommunicationParameters=NoCtldInAddrAny,NoInAddrAny
MailProg=/bin/true
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/run/slurmctld.pid
SlurmdPidFile=$dir/run/slurmd.pid
SlurmctldLogFile=$dir/log/slurmctld.log
SlurmdLogFile=$dir/log/slurmd.log
ReturnToService=2
MaxArraySize=1001
NodeName=localhost NodeAddr=127.0.0.1 CPUs=$cpus Sockets=1 CoresPerSocket=$cpus ThreadsPerCore=1 RealMemory=$mem State=UNKNOWN
PartitionName=local Nodes=localhost Default=YES MaxTime=INFINITE State=UP
EOF
  printf 'export SLURM_CONF=%q\n' "$dir/slurm.conf" >"$dir/env.sh"
  export SLURM_CONF="$dir/slurm.conf"

  munged -S "$dir/munge/munge.socket" --key-file="$dir/munge/munge.key" --log-file="$dir/log/munged.log" \
    --pid-file="$dir/run/munged.pid" --seed-file="$dir/munge/munge.seed" \
    || die "munged did not start; see $dir/log/munged.log"
  slurmctld -f "$SLURM_CONF" || { do_stop >/dev/null; die "slurmctld did not start; see $dir/log/slurmctld.log"; }
  # The machine's host name is not the node name: say which node this is.
  slurmd -f "$SLURM_CONF" -N localhost || { do_stop >/dev/null; die "slurmd did not start; see $dir/log/slurmd.log"; }

  local state="" i
  for ((i = 0; i < NODE_IDLE_WAIT; i++)); do
    state=$(sinfo -h -n localhost -o %T 2>/dev/null || true)
    [ "$state" = "idle" ] && break
    sleep 0.1
  done
  if [ "$state" != "idle" ]; then
    echo "slurm-local: the node did not become idle within $((NODE_IDLE_WAIT / 10)) s (state: '${state:-none}'). Last log lines:" >&2
    tail -n 5 "$dir/log/slurmctld.log" "$dir/log/slurmd.log" >&2 || true
    do_stop >/dev/null
    exit 1
  fi
  echo "slurm-local: node localhost idle; export SLURM_CONF=$dir/slurm.conf"
}

case "$cmd" in
  start) do_start ;;
  stop) do_stop ;;
  status)
    [ -f "$dir/slurm.conf" ] || die "no cluster configured in $dir"
    SLURM_CONF="$dir/slurm.conf" sinfo -h -n localhost -o '%T' ;;
  *) echo "usage: $0 start|stop|status [DIR]" >&2; exit 2 ;;
esac
