#!/usr/bin/env bash
# Stops everything deploy/engines/start-engines.sh started in <workdir>: cancels the Slurm jobs (so no job step
# outlives slurmd), ends the SSH sessions of the job user tied to this workdir, shuts MariaDB down cleanly and
# ends every recorded daemon with its children. Keys, database and Slurm state stay for the next start.
#
#   bash deploy/engines/stop-engines.sh <workdir>
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$HERE/lib.sh"

[ $# -eq 1 ] || eng_die "usage: bash deploy/engines/stop-engines.sh <workdir>"
[ -d "$1" ] || { eng_log "no workdir $1: nothing to stop"; exit 0; }
eng_layout "$(cd "$1" && pwd)"
[ -d "$ENG_RUN" ] || { eng_log "nothing was started in $ENG_WORK"; exit 0; }
export PATH="$PATH:/usr/sbin:/sbin"
T0=$EPOCHREALTIME
RUN_USER=sfrun
failed=0

# Jobs first, while slurmctld and slurmd can still end them properly.
if [ -n "$(eng_daemon_pids slurmctld)" ] && [ -f "$ENG_SLURM_CONF" ]; then
  export SLURM_CONF="$ENG_SLURM_CONF"
  mapfile -t jobs < <(timeout 10 squeue -h -o %A 2>/dev/null || true)
  if [ ${#jobs[@]} -gt 0 ]; then
    eng_log "cancelling ${#jobs[@]} job(s)"
    timeout 10 scancel "${jobs[@]}" 2>/dev/null || true
    for ((i = 0; i < 200; i++)); do
      [ -z "$(timeout 5 squeue -h -o %A 2>/dev/null)" ] && break
      sleep 0.05
    done
  fi
fi

# Whatever the cancel left: SSH sessions, job processes and job steps of this workdir.
mapfile -t leftovers < <(eng_workdir_processes "$RUN_USER" "$ENG_SLURM_CONF")
[ ${#leftovers[@]} -gt 0 ] && { eng_terminate 5 "${leftovers[@]}" || failed=1; }

# Daemons in reverse start order, each with its children (sshd's session processes, slurmctld's helper).
for ((d = ${#ENG_DAEMONS[@]} - 1; d >= 0; d--)); do
  name=${ENG_DAEMONS[$d]%%:*}
  mapfile -t pids < <(eng_daemon_pids "$name")
  if [ ${#pids[@]} -gt 0 ]; then
    t=$EPOCHREALTIME
    if [ "$name" = mariadb ]; then
      timeout 20 mariadb-admin --no-defaults --socket="$ENG_DB_SOCKET" shutdown >/dev/null 2>&1 || true
    fi
    tree=()
    for pid in "${pids[@]}"; do mapfile -t -O "${#tree[@]}" tree < <(eng_tree "$pid"); done
    eng_terminate 15 "${tree[@]}" || failed=1
    eng_log "stopped $name (pid ${pids[*]}) in $(eng_since "$t")s"
  fi
  rm -f "$ENG_RUN/$name.pid"
done
rm -f "$ENG_WORK/env.state" "$ENG_MUNGE_SOCKET" "$ENG_MUNGE_SOCKET.lock"

[ "$failed" = 0 ] || eng_die "some processes of $ENG_WORK could not be ended"
eng_log "engines of $ENG_WORK stopped in $(eng_since "$T0")s"
