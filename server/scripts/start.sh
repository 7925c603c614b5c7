#!/usr/bin/env bash
# `npm start`: everything from a fresh machine to the running product with demo data. Ctrl-C stops what it started.
set -euo pipefail
source "$(dirname "$0")/env.sh"
source "$(dirname "$0")/fakes-env.sh" 87

# Background processes run tsx directly, not through npx: `npm exec` wraps the command in a shell that does not
# pass SIGTERM on, so stopping the npx pid would leave the server itself running.
PIDS=()
cleanup() {
  trap - INT TERM EXIT
  log "stopping"
  for pid in "${PIDS[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${PIDS[@]}"; do wait "$pid" 2>/dev/null || true; done
  stop_cluster
}
trap cleanup INT TERM EXIT

ensure_node_modules
start_cluster
ensure_database thence
export PORT="${PORT:-8080}"
export PUBLIC_URL="${PUBLIC_URL:-http://127.0.0.1:$PORT}"
[ -s "$DATA_DIR/session-secret" ] || { head -c 32 /dev/urandom | base64 > "$DATA_DIR/session-secret"; chmod 600 "$DATA_DIR/session-secret"; }
export SESSION_SECRET="$(cat "$DATA_DIR/session-secret")"

log "migrating the database"
npx tsx server/db/migrate.ts
log "starting local stand-ins (OpenID Connect, SMTP catcher, Stripe)"
"$ROOT/node_modules/.bin/tsx" server/fakes/main.ts & PIDS+=($!)
wait_for_port "$SMTP_PORT" "SMTP catcher"; wait_for_port "$OAUTH_STANDIN_PORT" "OpenID Connect stand-in"; wait_for_port "$STRIPE_STANDIN_PORT" "Stripe stand-in"
log "seeding demo data"
npx tsx server/seed/index.ts
log "building the client"
npx vite build --logLevel warn
"$ROOT/node_modules/.bin/tsx" server/worker.ts & PIDS+=($!)
"$ROOT/node_modules/.bin/tsx" server/main.ts & PIDS+=($!)
wait_for_port "$PORT" "Thence"
cat <<MSG

  Thence is running at $PUBLIC_URL
  Demo mail (verification, receipts): $MAIL_VIEWER_URL
  Demo accounts (password for all: thence-demo-2026):
    publisher   ines.publisher@demo.thence.test
    subscriber  omar.subscriber@demo.thence.test
    admin       ada.admin@demo.thence.test
  "Sign in with Google" uses the local stand-in and signs in as the demo subscriber.
  Press Ctrl-C to stop.

MSG
wait -n "${PIDS[@]}" || true
