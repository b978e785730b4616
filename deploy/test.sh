#!/usr/bin/env bash
# Runs every Sigmaflow test suite on a fresh machine: installs what is missing, starts PostgreSQL and the
# fake services on throwaway ports and data, checks types and lint, then runs vitest (unit, client,
# integration, end-to-end in Chromium). Exits non-zero on any failure.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$SF_ROOT"

sf_ensure_debian_packages
sf_ensure_node_modules

WORK_DIR="$(mktemp -d /tmp/sigmaflow-test.XXXXXX)"
chmod 755 "$WORK_DIR"
PG_PORT="$(sf_free_port)"; APP_PORT="$(sf_free_port)"; IDP_PORT="$(sf_free_port)"
SMTP_PORT="$(sf_free_port)"; INBOX_PORT="$(sf_free_port)"
DB_NAME=sigmaflow_e2e
SECRETS_DIR="$WORK_DIR/secrets"; LOG_DIR="$WORK_DIR/logs"
mkdir -p "$SECRETS_DIR" "$LOG_DIR"
source "$SF_ROOT/deploy/env.sh"
export NODE_ENV=test
export AUTH_RATE_LIMIT_PER_MINUTE=1000
export LOG_LEVEL=warn

cleanup() {
  local status=$?
  trap - INT TERM EXIT
  sf_stop_all
  [ -d "$WORK_DIR/engines" ] && bash "$SF_ROOT/deploy/engines/stop-engines.sh" "$WORK_DIR/engines" >/dev/null 2>&1 || true
  sf_pg_stop "$WORK_DIR/pg/cluster"
  if [ "$status" -ne 0 ] && [ -d "$LOG_DIR" ]; then
    for f in "$LOG_DIR"/*.log; do [ -s "$f" ] && { echo "---- $f (last lines)"; tail -n 30 "$f"; }; done
  fi
  rm -rf "$WORK_DIR"
  exit "$status"
}
trap cleanup INT TERM EXIT

sf_log "typecheck and lint"
npx tsc -p tsconfig.json --noEmit
npx biome check .

sf_pg_start "$WORK_DIR/pg/cluster" "$PG_PORT" "-c fsync=off -c max_connections=300"

# Real engines for the scheduler tests: Debian's OpenSSH server and a single-node Slurm with accounting.
sf_log "starting OpenSSH and Slurm on loopback"
bash deploy/engines/start-engines.sh "$WORK_DIR/engines" "$WORK_DIR/engines.env" >"$LOG_DIR/engines.log" 2>&1 \
  || { tail -n 40 "$LOG_DIR/engines.log" >&2; sf_die "the test engines did not start"; }
source "$WORK_DIR/engines.env"
sf_pg_ensure_database "$PG_PORT" "$DB_NAME"
node --import tsx server/db/migrate.ts
node --import tsx deploy/demo/seed.ts
npx vite build --logLevel warn

sf_spawn fake-smtp "$LOG_DIR/fake-smtp.log" node --import tsx deploy/fake-smtp/index.ts
sf_spawn fake-idp "$LOG_DIR/fake-idp.log" node --import tsx deploy/fake-idp/index.ts
sf_wait_for_port "$IDP_PORT" fake-idp
sf_wait_for_port "$SMTP_PORT" fake-smtp
sf_spawn server "$LOG_DIR/server.log" node --import tsx server/index.ts
sf_wait_for_port "$APP_PORT" server 60

# What the suites read: an admin connection for per-file test databases, and the running app.
export TEST_PG_ADMIN_URL="postgres://postgres@127.0.0.1:${PG_PORT}/postgres"
export E2E_APP_URL="$SIGMAFLOW_PUBLIC_URL"
export E2E_INBOX_URL="$INBOX_URL"
export E2E_ARTIFACTS_DIR="$SF_ROOT/.artifacts/e2e"
export CHROMIUM_PATH="${CHROMIUM_PATH:-/usr/bin/chromium}"

npx vitest run "$@"
