#!/usr/bin/env bash
# Starts Sigmaflow for development on this machine: installs what is missing, starts a project-local
# PostgreSQL, applies migrations, seeds the demo scenario, starts the fake identity provider, the fake
# mail sink, the development cluster host (registered for the Kestrel group), the server and the worker,
# then the demo targets, codes and recipes, and queues the demo runs (see deploy/demo/seed-science.ts).
# A service that exits is started again after a back-off (1 s doubling to 30 s; see sf_supervise in lib.sh),
# with a line here and in its log. Ctrl-C or SIGTERM stops everything it started; a second start reuses
# the data in .data/ (or SIGMAFLOW_DATA_DIR).
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$SF_ROOT"

PG_PORT="${SIGMAFLOW_PG_PORT:-54329}"
APP_PORT="${SIGMAFLOW_PORT:-5180}"
IDP_PORT="${SIGMAFLOW_IDP_PORT:-5181}"
SMTP_PORT="${SIGMAFLOW_SMTP_PORT:-5182}"
INBOX_PORT="${SIGMAFLOW_INBOX_PORT:-5183}"
CLUSTER_PORT="${SIGMAFLOW_CLUSTER_PORT:-5184}"
DB_NAME=sigmaflow
DATA_DIR="${SIGMAFLOW_DATA_DIR:-$SF_ROOT/.data}"
SECRETS_DIR="$DATA_DIR/secrets"
LOG_DIR="$DATA_DIR/logs"
mkdir -p "$SECRETS_DIR" "$LOG_DIR" "$DATA_DIR/mail"

sf_ensure_debian_packages
sf_ensure_node_modules
source "$SF_ROOT/deploy/env.sh"

cleanup() {
  local status=$?
  trap - INT TERM HUP EXIT
  sf_log "stopping"
  sf_stop_all
  sf_pg_stop "$DATA_DIR/pg/cluster"
  exit "$status"
}
trap cleanup INT TERM HUP EXIT

sf_pg_start "$DATA_DIR/pg/cluster" "$PG_PORT"
sf_pg_ensure_database "$PG_PORT" "$DB_NAME"
node --import tsx server/db/migrate.ts
node --import tsx deploy/demo/seed.ts

sf_log "building the client"
npx vite build --logLevel warn

FAKE_SMTP_DIR="$DATA_DIR/mail" sf_supervise fake-smtp "$LOG_DIR/fake-smtp.log" node --import tsx deploy/fake-smtp/index.ts
sf_supervise fake-idp "$LOG_DIR/fake-idp.log" node --import tsx deploy/fake-idp/index.ts
export FAKE_CLUSTER_PORT="$CLUSTER_PORT" FAKE_CLUSTER_ROOT="$DATA_DIR/cluster/home"
export FAKE_CLUSTER_HOST_KEY="$DATA_DIR/cluster/host_key" FAKE_CLUSTER_AUTHORIZED_KEYS="$DATA_DIR/cluster/authorized_keys"
sf_supervise fake-cluster "$LOG_DIR/fake-cluster.log" node --import tsx deploy/fake-cluster/index.ts
sf_wait_for_port "$IDP_PORT" fake-idp
sf_wait_for_port "$SMTP_PORT" fake-smtp
sf_wait_for_port "$CLUSTER_PORT" fake-cluster
node --import tsx deploy/demo/seed-cluster.ts
sf_supervise server "$LOG_DIR/server.log" node --import tsx server/index.ts
sf_supervise worker "$LOG_DIR/worker.log" node --import tsx worker/index.ts
sf_wait_for_port "$APP_PORT" server 60
# Demo targets, codes, recipes and a few runs of both demo recipes, computed by the worker right away.
node --import tsx deploy/demo/seed-science.ts

node --import tsx deploy/demo/banner.ts
sf_log "running; logs in $LOG_DIR. Ctrl-C stops everything."
# The supervisors return only when stopped; Ctrl-C or SIGTERM runs cleanup.
wait
