#!/usr/bin/env bash
# Real-SLURM check of the cluster profile (workflow/profiles/slurm).
#
# Installs Debian's SLURM (slurmctld, slurmd, slurm-client) and MUNGE plus
# snakemake-executor-plugin-slurm, starts a one-node cluster on the loopback address, runs the
# workflow on the sample catalogue through the SLURM executor in a separate working folder, checks
# in SLURM's own job list that every job Snakemake ran went through SLURM and completed, checks the
# final outputs, and stops the daemons it started (by PID, also on failure or interruption).
#
# Needs root (apt-get, daemons). Takes about 2-4 minutes; safe to run again on the same machine.
# Exit status: 0 when the workflow ran through SLURM and produced its outputs; non-zero otherwise.
#
# Settings (environment):
#   CINDERCLOCK_SLURM_STATE    folder for the cluster's configuration, spool, daemon logs and the
#                              workflow's working folder (wiped at start; left for inspection)
#                              [/tmp/cinderclock-slurm-check]
#   CINDERCLOCK_SLURM_TIMEOUT  seconds the workflow may run before it is interrupted (SIGINT) [900]
#   CINDERCLOCK_PYTHON         Python interpreter with cinderclock's dependencies [python3]
#
# The cluster (facts of Debian 12's SLURM 22.05 on a machine without cgroups or systemd):
# daemons run as root with ProctrackType=proctrack/linuxproc and TaskPlugin=task/none; the node is
# `hostname -s` at 127.0.0.1; DefMemPerCPU and per-job mem_mb let jobs share the node; there is no
# slurmdbd, so `sacct` has no data and the plugin is told to poll `squeue`, which lists finished
# jobs for MinJobAge seconds (kept well above 3x the first status-check delay, as the plugin
# requires); /etc/slurm/slurm.conf links to our file because srun inside a job drops SLURM_CONF.
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
STATE=${CINDERCLOCK_SLURM_STATE:-/tmp/cinderclock-slurm-check}
TIME_LIMIT=${CINDERCLOCK_SLURM_TIMEOUT:-900}
PY=${CINDERCLOCK_PYTHON:-python3}
WORK=$STATE/work
MARKER="# cinderclock slurm_check.sh: one-node loopback cluster"
CTLD_PORT=6917                   # not SLURM's default 6817/6818: stays clear of a system cluster
SLURMD_PORT=6918
STATUS_DELAY=5                   # plugin: seconds before the first status check (default 40)
MIN_JOB_AGE=600                  # slurmctld keeps finished jobs this long (>= 3x STATUS_DELAY)
START=$SECONDS

say() { printf '[slurm-check %3ds] %s\n' "$((SECONDS - START))" "$*"; }
die() { say "FAIL: $*" >&2; exit 1; }
section() { printf '\n==== %s\n' "$*"; }

[ "$(id -u)" -eq 0 ] || die "must run as root (installs packages, starts the SLURM daemons)"
[[ "$STATE" == /?*/?* ]] || die "CINDERCLOCK_SLURM_STATE must be an absolute path below a folder (it is wiped)"

# --- stopping daemons by PID -------------------------------------------------------------------

# ours PID NAME: true when process PID is NAME and was started with a path under $STATE
# (guards against a PID that the system has since given to another process).
ours() {
  [[ "$1" =~ ^[0-9]+$ ]] && [ "$(cat "/proc/$1/comm" 2>/dev/null)" = "$2" ] \
    && tr '\0' ' ' < "/proc/$1/cmdline" 2>/dev/null | grep -qF "$STATE"
}

# stop_pidfile FILE NAME [SIGNAL] [SECONDS]: send SIGNAL (TERM) to the process in FILE if it is
# ours, wait up to SECONDS (10) for it to end, then SIGKILL it; remove FILE.
stop_pidfile() {
  local file=$1 name=$2 sig=${3:-TERM} wait_s=${4:-10} pid
  [ -s "$file" ] || return 0
  pid=$(cat "$file")
  rm -f "$file"
  ours "$pid" "$name" || return 0
  kill "-$sig" "$pid" 2>/dev/null || true
  for _ in $(seq $((wait_s * 5))); do
    [ -e "/proc/$pid" ] || break
    sleep 0.2
  done
  if [ -e "/proc/$pid" ]; then
    say "$name (PID $pid) still running after $wait_s s: SIGKILL"
    kill -KILL "$pid" 2>/dev/null || true
  fi
  say "stopped $name (PID $pid)"
}

stop_cluster() {
  # A workflow run still going (this run interrupted, or one left by a killed run) gets SIGINT,
  # on which Snakemake cancels its SLURM jobs (`timeout -k 60` below bounds how long it takes).
  stop_pidfile "$STATE/workflow.pid" timeout INT 90
  # Jobs still known to slurmctld next, while it can cancel them.
  if [ -s "$STATE/slurmctld.pid" ] && ours "$(cat "$STATE/slurmctld.pid")" slurmctld; then
    SLURM_CONF=$STATE/slurm.conf timeout 10 scancel --quiet --user=root 2>/dev/null || true
  fi
  stop_pidfile "$STATE/slurmd.pid" slurmd
  stop_pidfile "$STATE/slurmctld.pid" slurmctld
  stop_pidfile "$STATE/munge/munged.pid" munged
  # Remove our link to the configuration (never a file that is not ours).
  if [ -L /etc/slurm/slurm.conf ] && [ "$(readlink /etc/slurm/slurm.conf)" = "$STATE/slurm.conf" ]; then
    rm -f /etc/slurm/slurm.conf
  fi
}

on_exit() {
  local rc=$?
  trap - EXIT INT TERM
  section "Stopping the cluster"
  stop_cluster
  if [ "$rc" -eq 0 ]; then
    say "PASS: the workflow ran through SLURM (wall time $((SECONDS - START)) s)"
  else
    say "FAILED with status $rc (wall time $((SECONDS - START)) s); logs under $STATE" >&2
  fi
  exit "$rc"
}

# --- 1. packages ---------------------------------------------------------------------------------
section "1. Packages"
if command -v slurmctld >/dev/null && command -v slurmd >/dev/null && command -v sbatch >/dev/null \
   && command -v munged >/dev/null && command -v mungekey >/dev/null; then
  say "SLURM and MUNGE already installed: $(slurmctld -V)"
else
  say "installing slurmctld slurmd slurm-client munge with apt-get"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq -o DPkg::Lock::Timeout=300
  apt-get install -y -qq --no-install-recommends -o DPkg::Lock::Timeout=300 \
    slurmctld slurmd slurm-client munge >/dev/null
  say "installed $(slurmctld -V)"
fi
say "installing snakemake-executor-plugin-slurm (pip)"
"$PY" -m pip install --quiet --disable-pip-version-check --root-user-action=ignore \
  'snakemake-executor-plugin-slurm>=2,<3'
# The clone's own package, whichever copy pip installed in editable mode.
export PYTHONPATH="$ROOT/workflow${PYTHONPATH:+:$PYTHONPATH}"
export OMP_NUM_THREADS=1
"$PY" -c "import cinderclock, snakemake_executor_plugin_slurm" \
  || die "cinderclock's dependencies are missing: run pip install -e . first"
"$PY" -m snakemake --help 2>/dev/null | grep -q -- '--slurm-status-command' \
  || die "this snakemake-executor-plugin-slurm has no --slurm-status-command option"
say "snakemake $("$PY" -m snakemake --version), plugin $("$PY" -m pip show snakemake-executor-plugin-slurm 2>/dev/null | sed -n 's/^Version: //p')"

# --- 2. a clean state folder ---------------------------------------------------------------------
section "2. Cluster configuration in $STATE"
if [ -d "$STATE" ]; then
  say "a previous run left $STATE: stopping its daemons, wiping it"
  stop_cluster
  rm -rf "$STATE"
fi
trap on_exit EXIT
trap 'exit 130' INT
trap 'exit 143' TERM
mkdir -p "$STATE"/{munge,ctld,slurmd,log} "$WORK"
chmod 755 "$STATE" "$STATE/munge"   # the MUNGE socket's folder must be searchable by all (o+x)

NODE=$(hostname -s)
CPUS=$(getconf _NPROCESSORS_ONLN)   # not nproc: it obeys OMP_NUM_THREADS, set above
MEM_MB=$(slurmd -C | sed -n 's/.*RealMemory=\([0-9]*\).*/\1/p')
NODE_MEM=$((MEM_MB * 9 / 10))    # below what slurmd measures, or it drains the node
[ "$NODE_MEM" -ge 8000 ] || die "the node has ${NODE_MEM} MB for jobs; the profile's largest job asks 8000"
cat > "$STATE/slurm.conf" <<EOF
$MARKER
ClusterName=cinderclock
SlurmctldHost=$NODE(127.0.0.1)
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$STATE/munge/munge.socket
StateSaveLocation=$STATE/ctld
SlurmdSpoolDir=$STATE/slurmd
SlurmctldPidFile=$STATE/slurmctld.pid
SlurmdPidFile=$STATE/slurmd.pid
SlurmctldLogFile=$STATE/log/slurmctld.log
SlurmdLogFile=$STATE/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
MpiDefault=none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
DefMemPerCPU=1000
MinJobAge=$MIN_JOB_AGE
ReturnToService=2
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/filetxt
JobCompLoc=$STATE/log/jobcomp.txt
NodeName=$NODE NodeAddr=127.0.0.1 CPUs=$CPUS RealMemory=$NODE_MEM State=UNKNOWN
PartitionName=ci Nodes=$NODE Default=YES MaxTime=120 State=UP
EOF
export SLURM_CONF=$STATE/slurm.conf
# srun inside a batch job drops SLURM_CONF, so the default path must lead to our file.
mkdir -p /etc/slurm
if [ -e /etc/slurm/slurm.conf ] || [ -L /etc/slurm/slurm.conf ]; then
  if [ -L /etc/slurm/slurm.conf ] && { [ ! -e /etc/slurm/slurm.conf ] || grep -qF "$MARKER" /etc/slurm/slurm.conf; }; then
    rm -f /etc/slurm/slurm.conf   # a dangling link or one of ours
  else
    die "/etc/slurm/slurm.conf exists and is not ours: refusing to replace it (is this a cluster node?)"
  fi
fi
ln -s "$STATE/slurm.conf" /etc/slurm/slurm.conf
say "node $NODE at 127.0.0.1: $CPUS CPUs, $NODE_MEM MB; partition ci; ports $CTLD_PORT/$SLURMD_PORT"

# --- 3. daemons ----------------------------------------------------------------------------------
section "3. Daemons"
if command -v mungekey >/dev/null; then
  mungekey --create --keyfile="$STATE/munge/munge.key" --force
else
  dd if=/dev/urandom of="$STATE/munge/munge.key" bs=1024 count=1 status=none
fi
chmod 600 "$STATE/munge/munge.key"
munged --force --socket="$STATE/munge/munge.socket" --key-file="$STATE/munge/munge.key" \
  --pid-file="$STATE/munge/munged.pid" --log-file="$STATE/log/munged.log" \
  --seed-file="$STATE/munge/munged.seed"
munge -n -S "$STATE/munge/munge.socket" | unmunge -S "$STATE/munge/munge.socket" >/dev/null \
  || die "MUNGE does not decode its own credential (see $STATE/log/munged.log)"
say "munged running (PID $(cat "$STATE/munge/munged.pid"))"

slurmctld -c -f "$SLURM_CONF" || die "slurmctld did not start (see $STATE/log/slurmctld.log)"
for _ in $(seq 30); do
  scontrol ping 2>/dev/null | grep -q UP && break
  sleep 1
done
scontrol ping | grep -q UP || { tail -n 20 "$STATE/log/slurmctld.log" >&2; die "slurmctld does not answer"; }
say "slurmctld running (PID $(cat "$STATE/slurmctld.pid"))"

slurmd -f "$SLURM_CONF" || die "slurmd did not start (see $STATE/log/slurmd.log)"
for _ in $(seq 30); do
  [ "$(sinfo -h -n "$NODE" -o %T 2>/dev/null)" = idle ] && break
  sleep 1
done
if [ "$(sinfo -h -n "$NODE" -o %T)" != idle ]; then
  tail -n 20 "$STATE/log/slurmd.log" >&2
  die "node $NODE is $(sinfo -h -n "$NODE" -o '%T (%E)'), not idle"
fi
say "slurmd running (PID $(cat "$STATE/slurmd.pid")); sinfo:"
sinfo -N -o '  %N %P %T cpus=%c mem=%m'

# --- 4. the workflow through the SLURM executor --------------------------------------------------
section "4. Workflow on the sample catalogue through SLURM (time limit ${TIME_LIMIT} s)"
mkdir -p "$WORK/config"
cp "$ROOT/config/config.yaml" "$WORK/config/config.yaml"
ln -s "$ROOT/sample_catalog" "$WORK/sample_catalog"
say "working folder $WORK (results in $WORK/results)"
set +e
timeout -s INT -k 60 "$TIME_LIMIT" "$PY" -m snakemake \
  --snakefile "$ROOT/Snakefile" --directory "$WORK" \
  --workflow-profile "$ROOT/workflow/profiles/slurm" \
  --slurm-status-command squeue \
  --slurm-init-seconds-before-status-checks "$STATUS_DELAY" \
  --slurm-no-account \
  --slurm-keep-successful-logs \
  > "$STATE/snakemake.log" 2>&1 &
echo $! > "$STATE/workflow.pid"
wait $!
SMK_RC=$?
set -e
grep -E '^(Submitted|Job [0-9]+ has been submitted|Finished jobid|localrule|.*steps \(.*\) done)' \
  "$STATE/snakemake.log" | sed 's/^/  /' || true
if [ "$SMK_RC" -ne 0 ]; then
  tail -n 40 "$STATE/snakemake.log" | sed 's/^/  | /' >&2
  [ "$SMK_RC" -eq 124 ] && die "the workflow did not finish within ${TIME_LIMIT} s (interrupted)"
  die "snakemake exited with status $SMK_RC (full log: $STATE/snakemake.log)"
fi
say "snakemake finished (status 0)"

# --- 5. checks -----------------------------------------------------------------------------------
section "5. SLURM's job list"
squeue -t all -h -o '%i|%k|%T|%S|%M|%l|%C|%m|%N' > "$STATE/squeue.txt"
"$PY" - "$STATE/squeue.txt" "$STATE/log/jobcomp.txt" "$STATE/snakemake.log" <<'PY' \
  || die "the workflow's jobs did not all run and complete in SLURM (see PROBLEM lines above)"
"""Print SLURM's job table and compare it with the jobs Snakemake says it ran."""
import collections
import re
import sys

squeue_path, jobcomp_path, log_path = sys.argv[1:4]

# Exit codes from the job-completion log (one "key=value ..." line per finished job).
exit_codes = {}
try:
    with open(jobcomp_path) as fh:
        for line in fh:
            fields = dict(kv.split("=", 1) for kv in line.split() if "=" in kv)
            if "JobId" in fields:
                exit_codes[fields["JobId"]] = fields.get("ExitCode", "?")
except FileNotFoundError:
    pass

rows = []
with open(squeue_path) as fh:
    for line in fh:
        jobid, comment, state, start, elapsed, limit, cpus, mem, node = line.rstrip("\n").split("|")
        m = re.match(r"rule_(\w+?)(?:_wildcards_(.*))?$", comment)
        rule, wildcards = (m.group(1), m.group(2) or "") if m else (comment, "")
        rows.append((int(jobid), rule, wildcards, state, start.split("T")[-1], elapsed, limit, cpus, mem, node,
                     exit_codes.get(jobid, "?")))
rows.sort()
header = ("JOBID", "RULE", "WILDCARDS", "STATE", "START", "ELAPSED", "TIMELIMIT", "CPUS", "MEM", "NODE", "EXIT")
widths = [max(len(str(r[i])) for r in rows + [header]) for i in range(len(header))]
for r in [header] + rows:
    print("  " + "  ".join(str(v).ljust(w) for v, w in zip(r, widths)))

problems = []
if not rows:
    problems.append("SLURM lists no job at all: the workflow did not run through SLURM")
for r in rows:
    if r[3] != "COMPLETED" or r[-1] not in ("0:0", "?"):
        problems.append(f"SLURM job {r[0]} ({r[1]}) ended {r[3]}, exit code {r[-1]}")

# Jobs Snakemake ran: "Finished jobid: N (Rule: name)"; local ones are announced as "localrule".
with open(log_path) as fh:
    log = fh.read()
finished = collections.Counter(re.findall(r"Finished jobid: \d+ \(Rule: (\w+)\)", log))
local = set(re.findall(r"^localrule (\w+):", log, re.M)) | set(re.findall(r"^localcheckpoint (\w+):", log, re.M))
remote = collections.Counter({k: v for k, v in finished.items() if k not in local})
in_slurm = collections.Counter(r[1] for r in rows if r[3] == "COMPLETED")
print(f"\n  Snakemake ran {sum(finished.values())} jobs: {sum(remote.values())} through SLURM"
      f" ({', '.join(f'{k} x{v}' if v > 1 else k for k, v in sorted(remote.items()))}),"
      f" locally: {', '.join(sorted(local)) or 'none'}")
if not remote:
    problems.append("Snakemake reports no job submitted to SLURM")
missing = remote - in_slurm
if missing:
    problems.append(f"jobs Snakemake ran that SLURM did not complete: {dict(missing)}")
for required in ("ingest", "final"):
    if in_slurm[required] < 1:
        problems.append(f"no completed SLURM job for rule {required}")
for p in problems:
    print(f"  PROBLEM: {p}", file=sys.stderr)
sys.exit(1 if problems else 0)
PY
say "every job Snakemake ran went through SLURM and completed"

section "6. Outputs"
RESULTS=$WORK/results
for f in final/white_dwarfs.parquet final/rejects.parquet final/stage_counts.json; do
  [ -s "$RESULTS/$f" ] || die "missing output $RESULTS/$f"
  say "found $f ($(stat -c %s "$RESULTS/$f") bytes)"
done
"$PY" - "$RESULTS/final/stage_counts.json" <<'PY' || die "stage_counts.json does not add up"
"""Row conservation as recorded by the final stage."""
import json
import sys

counts = json.load(open(sys.argv[1]))
read, kept, rejected = counts["rows_read"], counts["rows_in_results"], counts["rows_rejected"]
print(f"  rows read {read} = {kept} in results + {rejected} rejected; shards {counts.get('shards')}")
sys.exit(0 if read == kept + rejected and read > 0 else 1)
PY
say "SLURM job logs kept under $WORK/.snakemake/slurm_logs/, rule logs under $RESULTS/logs/"
