# Environment shared by deploy/start.sh and deploy/test.sh. Expects PG_PORT, APP_PORT, IDP_PORT, SMTP_PORT,
# INBOX_PORT, DB_NAME and SECRETS_DIR to be set; exports what the services read.
export DATABASE_URL="postgres://postgres@127.0.0.1:${PG_PORT}/${DB_NAME}"
export SIGMAFLOW_PORT="$APP_PORT"
export SIGMAFLOW_PUBLIC_URL="http://127.0.0.1:${APP_PORT}"
export SESSION_SECRET="$(sf_secret_file "$SECRETS_DIR/session-secret")"
export SIGMAFLOW_SECRETS_KEY="$(sf_secret_file "$SECRETS_DIR/secrets-key")"
export OIDC_ISSUER="http://127.0.0.1:${IDP_PORT}"
export OIDC_CLIENT_ID="sigmaflow-dev"
export OIDC_CLIENT_SECRET="$(sf_secret_file "$SECRETS_DIR/oidc-client-secret")"
export OIDC_REDIRECT_URIS="${SIGMAFLOW_PUBLIC_URL}/api/auth/callback"
export OIDC_POST_LOGOUT_REDIRECT_URIS="${SIGMAFLOW_PUBLIC_URL}/"
export FAKE_IDP_PORT="$IDP_PORT"
export SMTP_HOST=127.0.0.1
export SMTP_PORT
export FAKE_SMTP_PORT="$SMTP_PORT"
export FAKE_INBOX_PORT="$INBOX_PORT"
export INBOX_URL="http://127.0.0.1:${INBOX_PORT}/"
export MAIL_FROM="Sigmaflow <no-reply@sigmaflow.local>"
