# Shell functions shared by deploy/engines/start-engines.sh and stop-engines.sh. Source it; do not run it.
#
# Every daemon is started in the foreground through `setsid` and its pid recorded in <workdir>/run/<name>.pid.
# A recorded pid counts as ours only if that process runs the expected program with the workdir in its
# arguments or environment (guards against a recycled pid, or another workdir's daemon, being taken for ours).

eng_log() { printf '\033[1;35m[engines]\033[0m %s\n' "$*" >&2; }
eng_die() { printf '\033[1;31m[engines]\033[0m %s\n' "$*" >&2; exit 1; }
# Under pipefail never end a pipe with `grep -q`: it stops reading at the first match, the writer dies of
# SIGPIPE and the whole pipe counts as failed. Filter to /dev/null instead.

# Seconds (with milliseconds) since the given $EPOCHREALTIME value.
eng_since() { awk -v a="$1" -v b="$EPOCHREALTIME" 'BEGIN { printf "%.2f", b - a }'; }

# The daemons in start order; stop goes the other way. name:expected /proc/<pid>/comm
ENG_DAEMONS=(sshd:sshd munged:munged mariadb:mariadbd slurmdbd:slurmdbd slurmctld:slurmctld slurmd:slurmd)

eng_layout() { # workdir
  ENG_WORK=$1
  ENG_RUN="$ENG_WORK/run"
  ENG_LOGS="$ENG_WORK/logs"
  ENG_SSH="$ENG_WORK/ssh"
  ENG_MUNGE="$ENG_WORK/munge"
  ENG_DB="$ENG_WORK/mariadb"
  ENG_SLURM="$ENG_WORK/slurm"
  ENG_REMOTE="$ENG_WORK/remote"
  ENG_MUNGE_SOCKET="$ENG_MUNGE/munge.socket"
  ENG_DB_SOCKET="$ENG_DB/mysqld.sock"
  ENG_SLURM_CONF="$ENG_SLURM/slurm.conf"
}

eng_comm_of() { # daemon name -> expected comm
  local entry
  for entry in "${ENG_DAEMONS[@]}"; do
    [ "${entry%%:*}" = "$1" ] && { printf '%s' "${entry#*:}"; return 0; }
  done
  return 1
}

# True if the process names this workdir in its arguments or, like slurmdbd, in its SLURM_CONF.
eng_of_workdir() { # pid
  { tr '\0' '\n' <"/proc/$1/cmdline"; tr '\0' '\n' <"/proc/$1/environ"; } 2>/dev/null \
    | grep -F "$ENG_WORK/" >/dev/null
}

# Prints the recorded pid of a daemon if that process is alive, runs the expected program and is ours.
eng_live_pid() { # name
  local name=$1 file="$ENG_RUN/$1.pid" pid
  [ -s "$file" ] || return 1
  pid=$(<"$file")
  [[ "$pid" =~ ^[0-9]+$ ]] || return 1
  eng_alive "$pid" || return 1
  [ "$(cat "/proc/$pid/comm" 2>/dev/null)" = "$(eng_comm_of "$name")" ] || return 1
  eng_of_workdir "$pid" || return 1
  printf '%s' "$pid"
}

# Every running process of a daemon of this workdir, recorded or not (an interrupted start can leave one
# whose pid file was already replaced).
eng_daemon_pids() { # name
  local comm pid proc_comm
  comm=$(eng_comm_of "$1")
  while read -r pid proc_comm; do
    [ "$proc_comm" = "$comm" ] && eng_alive "$pid" && eng_of_workdir "$pid" && printf '%s\n' "$pid"
  done < <(ps -e -o pid=,comm=)
  return 0
}

# Starts a daemon that stays in the foreground, in its own session so a terminal's Ctrl-C or the caller's exit
# does not reach it. setsid execs in place (a background child is never a group leader), so $! is the daemon.
eng_spawn() { # name, logfile, command...
  local name=$1 logfile=$2; shift 2
  setsid "$@" >>"$logfile" 2>&1 </dev/null &
  printf '%s\n' "$!" >"$ENG_RUN/$name.pid"
}

# The pid and all its descendants, deepest first.
eng_tree() { # pid
  local child
  for child in $(ps -o pid= --ppid "$1" 2>/dev/null); do eng_tree "$child"; done
  printf '%s\n' "$1"
}

eng_alive() { # pid
  [ -d "/proc/$1" ] && [ "$(awk '{ print $3 }' "/proc/$1/stat" 2>/dev/null)" != Z ]
}

# Sends TERM to the given pids, waits up to `seconds` for all to exit, then KILLs what is left.
eng_terminate() { # seconds, pids...
  local seconds=$1 pid left i; shift
  [ $# -eq 0 ] && return 0
  kill -TERM "$@" 2>/dev/null || true
  for ((i = 0; i < seconds * 20; i++)); do
    left=()
    for pid in "$@"; do eng_alive "$pid" && left+=("$pid"); done
    [ ${#left[@]} -eq 0 ] && return 0
    sleep 0.05
  done
  eng_log "still running after ${seconds}s, sending KILL: ${left[*]}"
  kill -KILL "${left[@]}" 2>/dev/null || true
  for ((i = 0; i < 40; i++)); do
    left=()
    for pid in "$@"; do eng_alive "$pid" && left+=("$pid"); done
    [ ${#left[@]} -eq 0 ] && return 0
    sleep 0.05
  done
  eng_log "could not end: ${left[*]}"
  return 1
}

# Processes tied to this workdir that are no daemon of ours: the job user's SSH sessions (sshd's SetEnv) and
# job processes, and the job steps (slurmstepd, which leaves slurmd's tree and session). All carry our
# SLURM_CONF in their environment; nothing else of that user, nor any other root process, is touched.
eng_workdir_processes() { # user, slurm_conf
  local uid pid owner comm
  uid=$(id -u "$1" 2>/dev/null) || uid=-1
  while read -r pid owner comm; do
    [ "$owner" = "$uid" ] || { [ "$owner" = 0 ] && [ "$comm" = slurmstepd ]; } || continue
    # A process may end between the listing and the read: that is not an error.
    { tr '\0' '\n' <"/proc/$pid/environ"; } 2>/dev/null | grep -xF "SLURM_CONF=$2" >/dev/null && printf '%s\n' "$pid"
  done < <(ps -e -o pid=,uid=,comm=)
  return 0
}
