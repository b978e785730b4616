#!/usr/bin/env bash
# Brings up, on 127.0.0.1 only, the compute back end that Sigmaflow's worker drives in the integration tests:
# Debian's OpenSSH server for a user `sfrun`, and a single-node Slurm cluster "sigmaflow-test" with full
# accounting (munged, MariaDB, slurmdbd, slurmctld, slurmd). Everything lives in <workdir>; no systemd.
#
#   bash deploy/engines/start-engines.sh <workdir> <env-file-to-write>
#
# Idempotent: when every daemon of <workdir> is already running it only rewrites the env file; when some are
# missing it stops the rest and starts all again (fresh ports, same keys, database and Slurm state, so job ids
# keep growing and sacct never sees two jobs with one id). On failure it stops what it started.
# Stop with: bash deploy/engines/stop-engines.sh <workdir>
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$HERE/lib.sh"

[ $# -eq 2 ] || eng_die "usage: bash deploy/engines/start-engines.sh <workdir> <env-file-to-write>"
[ "$(id -u)" = 0 ] || eng_die "run as root: it creates a user and starts sshd and slurmd"
[[ "$1$2" =~ [[:space:]] ]] && eng_die "paths with spaces are not supported (they end up in daemon configs)"

T0=$EPOCHREALTIME
mkdir -p "$1"
eng_layout "$(cd "$1" && pwd)"
ENV_FILE=$2
mkdir -p "$(dirname "$ENV_FILE")"
ENV_FILE="$(cd "$(dirname "$ENV_FILE")" && pwd)/$(basename "$ENV_FILE")"

CLUSTER=sigmaflow-test
RUN_USER=sfrun
ACCOUNT=sigmaflow
NODE="$(hostname -s)"
# Slurm drains a node configured with more CPUs than the machine really has.
CPUS="$(nproc)"

# ---- the programs, each with the Debian package that ships it -----------------------------------------------
missing=()
for entry in sshd:openssh-server ssh-keygen:openssh-client munged:munge munge:munge \
  mariadbd:mariadb-server mariadb-install-db:mariadb-server mariadb-admin:mariadb-client mariadb:mariadb-client \
  slurmdbd:slurmdbd slurmctld:slurmctld slurmd:slurmd sinfo:slurm-client sacctmgr:slurm-client \
  scancel:slurm-client squeue:slurm-client setsid:util-linux runuser:util-linux useradd:passwd usermod:passwd; do
  bin=${entry%%:*}
  PATH="$PATH:/usr/sbin:/sbin" command -v "$bin" >/dev/null 2>&1 || missing+=("$bin (Debian package ${entry#*:})")
done
[ ${#missing[@]} -eq 0 ] || eng_die "missing programs: ${missing[*]}. Install deploy/apt-packages.txt \
(deploy/test.sh does: apt-get install -y --no-install-recommends \$(cat deploy/apt-packages.txt))"
export PATH="$PATH:/usr/sbin:/sbin"

# ---- already up? ------------------------------------------------------------------------------------------------
running=() stopped=()
for entry in "${ENG_DAEMONS[@]}"; do
  name=${entry%%:*}
  if eng_live_pid "$name" >/dev/null; then running+=("$name"); else stopped+=("$name"); fi
done
if [ ${#stopped[@]} -eq 0 ] && [ -s "$ENG_WORK/env.state" ]; then
  eng_log "all engines of $ENG_WORK already running; rewriting $ENV_FILE"
  cp "$ENG_WORK/env.state" "$ENV_FILE"
  exit 0
fi
if [ ${#running[@]} -gt 0 ]; then
  eng_log "partly running (${running[*]}; not: ${stopped[*]}): restarting all"
  bash "$HERE/stop-engines.sh" "$ENG_WORK"
fi

started_ok=0
on_exit() {
  local status=$?
  if [ "$started_ok" != 1 ]; then
    eng_log "start failed (exit $status); last log lines:"
    for f in "$ENG_LOGS"/*.log; do [ -s "$f" ] && { echo "---- $f" >&2; tail -n 15 "$f" >&2; }; done
    bash "$HERE/stop-engines.sh" "$ENG_WORK" || true
  fi
}
trap on_exit EXIT

mkdir -p "$ENG_RUN" "$ENG_LOGS" "$ENG_SSH" "$ENG_MUNGE" "$ENG_DB" "$ENG_SLURM/state" "$ENG_SLURM/spool" "$ENG_REMOTE"
# The job user reaches the munge socket, the Slurm config and the run folders through the workdir.
chmod 755 "$ENG_WORK" "$ENG_RUN" "$ENG_SSH" "$ENG_MUNGE" "$ENG_SLURM"
chmod 700 "$ENG_LOGS" "$ENG_DB"
rm -f "$ENG_RUN"/*.pid

step() { # message; prints the time since the previous step
  eng_log "$(printf '%-44s' "$1") +$(eng_since "${STEP_T:-$T0}")s"
  STEP_T=$EPOCHREALTIME
}

wait_until() { # seconds, description, command...
  local seconds=$1 what=$2 i; shift 2
  for ((i = 0; i < seconds * 20; i++)); do
    "$@" >/dev/null 2>&1 && return 0
    sleep 0.05
  done
  eng_die "$what: not ready within ${seconds}s"
}

port_open() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# Distinct free ports, held open together while chosen so no two are the same.
free_ports() { # count
  if command -v node >/dev/null 2>&1; then
    node -e '
      const net = require("net"); const n = Number(process.argv[1]); const servers = [];
      const next = () => { if (servers.length === n) { console.log(servers.map((s) => s.address().port).join(" "));
        servers.forEach((s) => s.close()); return; }
        const s = net.createServer(); s.listen(0, "127.0.0.1", () => { servers.push(s); next(); }); };
      next();' "$1"
  else
    local ports=() p
    while [ ${#ports[@]} -lt "$1" ]; do
      p=$((20000 + RANDOM % 40000))
      port_open "$p" || [[ " ${ports[*]} " == *" $p "* ]] || ports+=("$p")
    done
    echo "${ports[*]}"
  fi
}

read -r SSH_PORT DB_PORT DBD_PORT CTLD_PORT SLURMD_PORT < <(free_ports 5)

# ---- 1. the job user and the keys --------------------------------------------------------------------------------
if ! id "$RUN_USER" >/dev/null 2>&1; then
  useradd --create-home --home-dir "/home/$RUN_USER" --shell /bin/bash --user-group "$RUN_USER"
fi
# useradd leaves the account locked ("!"), which sshd refuses even for key login when PAM is off.
usermod -p '*' "$RUN_USER"
RUN_HOME="$(getent passwd "$RUN_USER" | cut -d: -f6)"
mkdir -p "$RUN_HOME/.ssh"
chown "$RUN_USER:$RUN_USER" "$RUN_HOME" "$RUN_HOME/.ssh"
chmod 755 "$RUN_HOME"
chmod 700 "$RUN_HOME/.ssh"
runuser -u "$RUN_USER" -- test -x "$ENG_WORK" \
  || eng_die "$RUN_USER cannot enter $ENG_WORK: choose a workdir whose parents are world-searchable (e.g. /tmp/...)"

[ -s "$ENG_SSH/host_key" ] || ssh-keygen -q -t ed25519 -N '' -C "sigmaflow-engines-host" -f "$ENG_SSH/host_key"
[ -s "$ENG_SSH/client_key" ] || ssh-keygen -q -t ed25519 -N '' -C "sigmaflow-engines:$ENG_WORK" -f "$ENG_SSH/client_key"
chmod 600 "$ENG_SSH/host_key" "$ENG_SSH/client_key"

# Several workdirs may be in use at once (a developer's and the test command's): keep every key whose workdir
# still exists, drop the others, add ours once. Keys are only accepted from loopback.
AUTH_KEYS="$RUN_HOME/.ssh/authorized_keys"
touch "$AUTH_KEYS"
{
  while IFS= read -r line; do
    comment=${line##* }
    if [[ "$comment" == sigmaflow-engines:* ]]; then
      dir=${comment#sigmaflow-engines:}
      [ "$dir" = "$ENG_WORK" ] && continue
      [ -d "$dir/ssh" ] || continue
    fi
    printf '%s\n' "$line"
  done <"$AUTH_KEYS"
  printf 'from="127.0.0.1",no-agent-forwarding,no-X11-forwarding %s\n' "$(<"$ENG_SSH/client_key.pub")"
} >"$AUTH_KEYS.new"
mv "$AUTH_KEYS.new" "$AUTH_KEYS"
chown "$RUN_USER:$RUN_USER" "$AUTH_KEYS"
chmod 600 "$AUTH_KEYS"

chown "$RUN_USER:$RUN_USER" "$ENG_REMOTE"
chmod 755 "$ENG_REMOTE"
step "user $RUN_USER and keys"

# ---- 2. sshd ------------------------------------------------------------------------------------------------------
mkdir -p /run/sshd
chmod 755 /run/sshd
cat >"$ENG_SSH/sshd_config" <<EOF
# Written by deploy/engines/start-engines.sh: a loopback-only sshd for the integration tests.
Port $SSH_PORT
ListenAddress 127.0.0.1
HostKey $ENG_SSH/host_key
PidFile $ENG_SSH/sshd.pid
AllowUsers $RUN_USER
PermitRootLogin no
PubkeyAuthentication yes
AuthorizedKeysFile .ssh/authorized_keys
PasswordAuthentication no
KbdInteractiveAuthentication no
UsePAM no
StrictModes yes
PrintMotd no
MaxSessions 10
MaxStartups 50:30:100
Subsystem sftp internal-sftp
# Non-interactive commands read no profile: this is how sbatch and friends find the cluster.
SetEnv SLURM_CONF=$ENG_SLURM_CONF
EOF
/usr/sbin/sshd -t -f "$ENG_SSH/sshd_config" || eng_die "sshd rejected $ENG_SSH/sshd_config"
eng_spawn sshd "$ENG_LOGS/sshd.log" /usr/sbin/sshd -D -e -f "$ENG_SSH/sshd_config"
# Not waited for here: checked with the other ports at the end.

# ---- 3a. munged ---------------------------------------------------------------------------------------------------
if [ ! -s "$ENG_MUNGE/munge.key" ]; then
  (umask 077 && dd if=/dev/urandom of="$ENG_MUNGE/munge.key" bs=1024 count=1 status=none)
fi
chmod 600 "$ENG_MUNGE/munge.key"
rm -f "$ENG_MUNGE_SOCKET" "$ENG_MUNGE_SOCKET.lock"
eng_spawn munged "$ENG_LOGS/munged.log" munged --foreground --force --socket="$ENG_MUNGE_SOCKET" \
  --key-file="$ENG_MUNGE/munge.key" --pid-file="$ENG_MUNGE/munged.pid" --log-file="$ENG_LOGS/munged.log" \
  --seed-file="$ENG_MUNGE/munged.seed"
wait_until 10 munged bash -c "munge -n -S '$ENG_MUNGE_SOCKET' | unmunge -S '$ENG_MUNGE_SOCKET'"
runuser -u "$RUN_USER" -- bash -c "munge -n -S '$ENG_MUNGE_SOCKET' | unmunge -S '$ENG_MUNGE_SOCKET'" >/dev/null \
  || eng_die "$RUN_USER cannot use the munge socket $ENG_MUNGE_SOCKET"
step "munged"

# ---- 3b. MariaDB --------------------------------------------------------------------------------------------------
DB_OPTS=(--no-defaults --datadir="$ENG_DB/data" --user=root)
if [ ! -d "$ENG_DB/data/mysql" ]; then
  rm -rf "$ENG_DB/data"
  mariadb-install-db "${DB_OPTS[@]}" --auth-root-authentication-method=socket --skip-test-db \
    --skip-name-resolve >"$ENG_LOGS/mariadb-install.log" 2>&1 || eng_die "mariadb-install-db failed"
  step "mariadb-install-db (first start only)"
fi
mkdir -p "$ENG_DB/tmp"
# Throwaway database: durability settings off, small buffers, TCP on loopback only.
eng_spawn mariadb "$ENG_LOGS/mariadb.log" mariadbd "${DB_OPTS[@]}" --socket="$ENG_DB_SOCKET" \
  --port="$DB_PORT" --bind-address=127.0.0.1 --pid-file="$ENG_DB/mariadbd.pid" --tmpdir="$ENG_DB/tmp" \
  --skip-name-resolve --skip-log-bin --innodb-buffer-pool-size=64M --innodb-flush-log-at-trx-commit=0 \
  --innodb-doublewrite=0 --sync-frm=0 --log-error="$ENG_LOGS/mariadb.log"
wait_until 30 mariadb mariadb-admin --no-defaults --socket="$ENG_DB_SOCKET" ping
if [ ! -s "$ENG_DB/slurm-password" ]; then
  (umask 077 && head -c 24 /dev/urandom | base64 | tr -d '/+=' >"$ENG_DB/slurm-password")
fi
DB_PASS=$(<"$ENG_DB/slurm-password")
mariadb --no-defaults --socket="$ENG_DB_SOCKET" -u root <<EOF
CREATE USER IF NOT EXISTS 'slurm'@'127.0.0.1' IDENTIFIED BY '$DB_PASS';
ALTER USER 'slurm'@'127.0.0.1' IDENTIFIED BY '$DB_PASS';
GRANT ALL ON slurm_acct_db.* TO 'slurm'@'127.0.0.1';
FLUSH PRIVILEGES;
EOF
step "mariadb"

# ---- 3c. Slurm configuration -------------------------------------------------------------------------------------
export SLURM_CONF="$ENG_SLURM_CONF"
cat >"$ENG_SLURM/slurmdbd.conf" <<EOF
# Written by deploy/engines/start-engines.sh.
AuthType=auth/munge
AuthInfo=socket=$ENG_MUNGE_SOCKET
DbdHost=$NODE
DbdAddr=127.0.0.1
DbdPort=$DBD_PORT
SlurmUser=root
PidFile=$ENG_SLURM/slurmdbd.pid
LogFile=$ENG_LOGS/slurmdbd.log
DebugLevel=info
StorageType=accounting_storage/mysql
StorageHost=127.0.0.1
StoragePort=$DB_PORT
StorageUser=slurm
StoragePass=$DB_PASS
StorageLoc=slurm_acct_db
EOF
# slurmdbd refuses a config that others can read (it holds the database password).
chmod 600 "$ENG_SLURM/slurmdbd.conf"

cat >"$ENG_SLURM_CONF" <<EOF
# Written by deploy/engines/start-engines.sh: a one-node test cluster on loopback.
ClusterName=$CLUSTER
SlurmctldHost=$NODE(127.0.0.1)
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$ENG_MUNGE_SOCKET
CredType=cred/munge
StateSaveLocation=$ENG_SLURM/state
SlurmdSpoolDir=$ENG_SLURM/spool
SlurmctldPidFile=$ENG_SLURM/slurmctld.pid
SlurmdPidFile=$ENG_SLURM/slurmd.pid
SlurmctldLogFile=$ENG_LOGS/slurmctld.log
SlurmdLogFile=$ENG_LOGS/slurmd.log
SlurmctldDebug=info
SlurmdDebug=info
# No cgroups in a container: track processes through /proc, bind no tasks.
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
# Samples /proc so sacct reports CPU time (TotalCPU) besides elapsed time.
JobAcctGatherType=jobacct_gather/linux
JobAcctGatherFrequency=task=5
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
SchedulerParameters=batch_sched_delay=0
MpiDefault=none
MailProg=/bin/true
ReturnToService=2
SlurmdParameters=config_overrides
InactiveLimit=0
KillWait=5
AccountingStorageType=accounting_storage/slurmdbd
AccountingStorageHost=127.0.0.1
AccountingStoragePort=$DBD_PORT
AccountingStoragePass=$ENG_MUNGE_SOCKET
JobCompType=jobcomp/none
NodeName=$NODE NodeAddr=127.0.0.1 NodeHostname=$NODE CPUs=$CPUS State=UNKNOWN
PartitionName=batch Nodes=$NODE Default=YES MaxTime=INFINITE State=UP
EOF
chmod 644 "$ENG_SLURM_CONF"

# ---- 3d. slurmdbd, cluster registration, slurmctld, slurmd -------------------------------------------------------
eng_spawn slurmdbd "$ENG_LOGS/slurmdbd.log" slurmdbd -D
# The first start creates the accounting tables, which takes a few seconds.
wait_until 60 "slurmdbd (port $DBD_PORT)" port_open "$DBD_PORT"
if ! grep -qx "$CLUSTER" <<<"$(sacctmgr -n -P show cluster format=cluster)"; then
  sacctmgr -i add cluster "$CLUSTER" >/dev/null
fi
step "slurmdbd"

eng_spawn slurmctld "$ENG_LOGS/slurmctld.log" slurmctld -D -f "$ENG_SLURM_CONF"
wait_until 30 "slurmctld (port $CTLD_PORT)" port_open "$CTLD_PORT"
eng_spawn slurmd "$ENG_LOGS/slurmd.log" slurmd -D -f "$ENG_SLURM_CONF"

if ! grep -qx "$ACCOUNT" <<<"$(sacctmgr -n -P show account format=account)"; then
  sacctmgr -i add account "$ACCOUNT" Cluster="$CLUSTER" Description="Sigmaflow test runs" Organization=sigmaflow >/dev/null
fi
if ! grep -qx "$RUN_USER" <<<"$(sacctmgr -n -P show user format=user)"; then
  sacctmgr -i add user "$RUN_USER" Account="$ACCOUNT" Cluster="$CLUSTER" >/dev/null
fi

node_idle() { [[ "$(sinfo -h -n "$NODE" -o %T)" == idle* ]]; }
wait_until 30 "node $NODE idle in sinfo" node_idle
step "slurmctld, slurmd, node idle"

wait_until 10 "sshd (port $SSH_PORT)" port_open "$SSH_PORT"

# ---- 4. the env file ----------------------------------------------------------------------------------------------
PIDS=()
for entry in "${ENG_DAEMONS[@]}"; do
  pid=$(eng_live_pid "${entry%%:*}") || eng_die "${entry%%:*} exited during start (see $ENG_LOGS)"
  PIDS+=("$pid")
done
# Single-quoted values: none of them can hold a quote (paths without spaces, ports, a base64 key).
env_line() { [[ "$2" != *"'"* ]] || eng_die "unexpected quote in $1"; printf "export %s='%s'\n" "$1" "$2"; }
{
  echo "# Written by deploy/engines/start-engines.sh; stop with: bash deploy/engines/stop-engines.sh \"\$ENGINE_WORKDIR\""
  env_line ENGINE_WORKDIR "$ENG_WORK"
  env_line ENGINE_SSH_HOST 127.0.0.1
  env_line ENGINE_SSH_PORT "$SSH_PORT"
  env_line ENGINE_SSH_USER "$RUN_USER"
  env_line ENGINE_SSH_KEY "$ENG_SSH/client_key"
  env_line ENGINE_SSH_HOST_KEY_PUB "$(cut -d' ' -f1,2 "$ENG_SSH/host_key.pub")"
  env_line ENGINE_SLURM_CONF "$ENG_SLURM_CONF"
  env_line ENGINE_SLURM_CLUSTER "$CLUSTER"
  env_line ENGINE_SLURM_ACCOUNT "$ACCOUNT"
  env_line ENGINE_SLURM_PARTITION batch
  env_line ENGINE_SLURM_CPUS "$CPUS"
  env_line ENGINE_REMOTE_BASE "$ENG_REMOTE"
  env_line ENGINE_PIDS "${PIDS[*]}"
} >"$ENG_WORK/env.state"
cp "$ENG_WORK/env.state" "$ENV_FILE"
started_ok=1
step "env file $ENV_FILE"
eng_log "engines up in $(eng_since "$T0")s: ssh 127.0.0.1:$SSH_PORT, slurmctld :$CTLD_PORT, slurmdbd :$DBD_PORT, mariadb :$DB_PORT"
