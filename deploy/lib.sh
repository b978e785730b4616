# Shared shell functions for deploy/start.sh and deploy/test.sh. Source it; do not run it.
# Everything here is idempotent: a second call finds what the first one made.

SF_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
PG_BIN="${PG_BIN:-/usr/lib/postgresql/15/bin}"

sf_log() { printf '\033[1;36m[sigmaflow]\033[0m %s\n' "$*" >&2; }
sf_die() { printf '\033[1;31m[sigmaflow]\033[0m %s\n' "$*" >&2; exit 1; }

as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo "$@"; fi; }

# Installs the Debian packages listed in deploy/apt-packages.txt that are missing.
sf_ensure_debian_packages() {
  local wanted missing=()
  mapfile -t wanted < <(grep -Ev '^\s*(#|$)' "$SF_ROOT/deploy/apt-packages.txt")
  for pkg in "${wanted[@]}"; do
    dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
  done
  [ ${#missing[@]} -eq 0 ] && return 0
  sf_log "installing Debian packages: ${missing[*]}"
  as_root env DEBIAN_FRONTEND=noninteractive apt-get update -qq
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
}

# Runs `npm ci` when node_modules is missing or older than the lock file.
sf_ensure_node_modules() {
  local stamp="$SF_ROOT/node_modules/.sigmaflow-lock-stamp"
  if [ -f "$stamp" ] && cmp -s "$stamp" "$SF_ROOT/package-lock.json"; then return 0; fi
  sf_log "installing npm packages (npm ci)"
  (cd "$SF_ROOT" && npm ci --no-audit --no-fund --loglevel=error) || sf_die "npm ci failed"
  cp "$SF_ROOT/package-lock.json" "$stamp"
}

# A free TCP port on 127.0.0.1 for a service started later. Chosen below the kernel's ephemeral range
# (ip_local_port_range, 32768-60999 on Debian), so a port another process later receives from listen(0) or
# an outgoing connection can never take it between this choice and the service's bind; ports handed out
# earlier by this script are never handed out again (the list is a file: callers use $(sf_free_port)).
SF_HANDED_PORTS_FILE="$(mktemp /tmp/sigmaflow-ports.XXXXXX)"
sf_free_port() {
  local low=20000 high=32767 p i
  for ((i = 0; i < 200; i++)); do
    p=$((low + (RANDOM * 32768 + RANDOM) % (high - low + 1)))
    grep -qx "$p" "$SF_HANDED_PORTS_FILE" && continue
    (exec 3<>"/dev/tcp/127.0.0.1/$p") 2>/dev/null && continue
    node -e 'const s=require("net").createServer();s.on("error",()=>process.exit(1));s.listen(Number(process.argv[1]),"127.0.0.1",()=>s.close())' "$p" || continue
    echo "$p" >>"$SF_HANDED_PORTS_FILE"
    echo "$p"
    return 0
  done
  sf_die "no free TCP port between $low and $high on 127.0.0.1"
}

sf_wait_for_port() { # port, name, seconds
  local port=$1 name=$2 seconds=${3:-30} i
  for ((i = 0; i < seconds * 10; i++)); do
    (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null && return 0
    sleep 0.1
  done
  sf_die "$name did not open port $port within ${seconds}s"
}

# Creates (once) and starts a PostgreSQL cluster in DATA_DIR on PORT, listening on 127.0.0.1 only.
# initdb refuses root, so the cluster belongs to the postgres user; its parent folder must be theirs too.
sf_pg_start() { # data_dir, port, [extra postgres options]
  local data_dir=$1 port=$2 extra=${3:-}
  local parent; parent=$(dirname "$data_dir")
  mkdir -p "$parent"
  id postgres >/dev/null 2>&1 || sf_die "the postgres user is missing: is the postgresql package installed?"
  chown postgres:postgres "$parent"
  chmod 755 "$parent"
  if [ ! -f "$data_dir/PG_VERSION" ]; then
    sf_log "creating PostgreSQL cluster in $data_dir"
    runuser -u postgres -- "$PG_BIN/initdb" -D "$data_dir" -U postgres -A trust -E UTF8 --no-locale >/dev/null \
      || sf_die "initdb failed"
  fi
  if runuser -u postgres -- "$PG_BIN/pg_ctl" -D "$data_dir" status >/dev/null 2>&1; then
    sf_log "PostgreSQL already running in $data_dir"
    return 0
  fi
  runuser -u postgres -- "$PG_BIN/pg_ctl" -D "$data_dir" -l "$parent/postgresql.log" -w -t 30 \
    -o "-c listen_addresses=127.0.0.1 -p $port -k $parent $extra" start >/dev/null \
    || { tail -n 20 "$parent/postgresql.log" >&2; sf_die "PostgreSQL did not start"; }
}

sf_pg_stop() { # data_dir
  runuser -u postgres -- "$PG_BIN/pg_ctl" -D "$1" -m fast -w stop >/dev/null 2>&1 || true
}

sf_pg_ensure_database() { # port, name
  local port=$1 name=$2
  "$PG_BIN/psql" -h 127.0.0.1 -p "$port" -U postgres -tAc "select 1 from pg_database where datname='$name'" \
    | grep -q 1 || "$PG_BIN/createdb" -h 127.0.0.1 -p "$port" -U postgres "$name"
}

# Background processes started through sf_spawn or sf_supervise are stopped by sf_stop_all (installed as an
# EXIT trap).
SF_PIDS=()
sf_spawn() { # name, logfile, command...
  local name=$1 logfile=$2; shift 2
  "$@" >"$logfile" 2>&1 &
  SF_PIDS+=("$!")
  sf_log "started $name (pid $!, log $logfile)"
}

# Restart back-off of sf_supervise, in whole seconds: the first delay, the most it doubles to, and how long
# a run must last for the next restart to start from the first delay again.
SF_RESTART_FIRST_DELAY_S="${SF_RESTART_FIRST_DELAY_S:-1}"
SF_RESTART_MAX_DELAY_S="${SF_RESTART_MAX_DELAY_S:-30}"
SF_RESTART_RESET_AFTER_S="${SF_RESTART_RESET_AFTER_S:-60}"

# Like sf_spawn, but the service is started again whenever it exits, after a back-off; each restart is
# announced on stdout and in the service's log. SIGTERM, SIGINT or SIGHUP to the supervisor (sf_stop_all
# sends TERM) stops the service and the supervisor without a restart. The service runs in its own session,
# so a terminal's Ctrl-C reaches it only through its supervisor and never looks like a crash.
sf_supervise() { # name, logfile, command...
  local name=$1 logfile=$2; shift 2
  : >"$logfile"
  (
    child=""
    stop() {
      if [ -n "$child" ]; then kill -TERM "$child" 2>/dev/null || true; wait "$child" 2>/dev/null || true; fi
      exit 0
    }
    trap stop TERM INT HUP
    delay=$SF_RESTART_FIRST_DELAY_S
    while :; do
      started=$SECONDS
      setsid "$@" >>"$logfile" 2>&1 &
      child=$!
      status=0
      # (stderr: bash's own "Killed" notice; the status below says it)
      wait "$child" 2>/dev/null || status=$?
      child=""
      lasted=$((SECONDS - started))
      if [ "$lasted" -ge "$SF_RESTART_RESET_AFTER_S" ]; then delay=$SF_RESTART_FIRST_DELAY_S; fi
      how="with status $status"
      if [ "$status" -gt 128 ]; then how="by signal $(kill -l "$((status - 128))" 2>/dev/null || echo "$((status - 128))") (status $status)"; fi
      message="$name exited $how after ${lasted}s; restarting in ${delay}s (at $(date -d "+${delay} seconds" +%H:%M:%S))"
      printf '[sigmaflow] %s\n' "$message"
      printf '%s [sigmaflow] %s\n' "$(date +%Y-%m-%dT%H:%M:%S%z)" "$message" >>"$logfile"
      sleep "$delay" &
      child=$!
      wait "$child" || true
      child=""
      delay=$((delay * 2 > SF_RESTART_MAX_DELAY_S ? SF_RESTART_MAX_DELAY_S : delay * 2))
    done
  ) &
  SF_PIDS+=("$!")
  sf_log "started $name under supervision (supervisor pid $!, log $logfile)"
}

sf_stop_all() {
  local pid
  for pid in "${SF_PIDS[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${SF_PIDS[@]}"; do wait "$pid" 2>/dev/null || true; done
  SF_PIDS=()
  rm -f "$SF_HANDED_PORTS_FILE"
}

# A secret kept in a file (created once with 48 random bytes, base64url).
sf_secret_file() { # path
  local path=$1
  if [ ! -s "$path" ]; then
    umask 077
    node -e 'process.stdout.write(require("crypto").randomBytes(48).toString("base64url"))' >"$path"
  fi
  cat "$path"
}
