#!/usr/bin/env bash
# `npm test`: the whole suite (unit, API, browser journeys) against its own database; ends with "N passed, N failed".
set -uo pipefail
source "$(dirname "$0")/env.sh"
source "$(dirname "$0")/fakes-env.sh" "${THENCE_PORT_BLOCK:-97}"

# Background processes run tsx directly, not through npx: `npm exec` wraps the command in a shell that does not
# pass SIGTERM on, so stopping the npx pid would leave the server itself running.
PIDS=()
cleanup() {
  trap - INT TERM EXIT
  for pid in "${PIDS[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${PIDS[@]}"; do wait "$pid" 2>/dev/null || true; done
  stop_cluster
}
trap cleanup INT TERM EXIT

ensure_node_modules
missing=()
command -v chromium >/dev/null || missing+=(chromium)
command -v clingo >/dev/null || missing+=(gringo)
apt_install "${missing[@]}"
start_cluster
ensure_database thence_test fresh
export NODE_ENV=test
export PORT=0
export SESSION_SECRET="test-session-secret-$(date +%s)"
export THENCE_DATA_DIR="$DATA_DIR/test"
rm -rf "$THENCE_DATA_DIR"; mkdir -p "$THENCE_DATA_DIR"
ARTIFACTS="$ROOT/.artifacts"; mkdir -p "$ARTIFACTS"

npx tsx server/db/migrate.ts || die "migrations failed"
"$ROOT/node_modules/.bin/tsx" server/fakes/main.ts > "$ARTIFACTS/fakes.log" 2>&1 & PIDS+=($!)
wait_for_port "$SMTP_PORT" "SMTP catcher"; wait_for_port "$OAUTH_STANDIN_PORT" "OpenID Connect stand-in"; wait_for_port "$STRIPE_STANDIN_PORT" "Stripe stand-in"
npx vite build --logLevel warn || die "client build failed"

npx vitest run --reporter=default --reporter=json --outputFile.json="$ARTIFACTS/vitest.json" "$@"
status=$?
summary="$(node -e '
  const fs = require("fs");
  try {
    const r = JSON.parse(fs.readFileSync(process.argv[1], "utf8"));
    const skipped = (r.numPendingTests || 0) + (r.numTodoTests || 0);
    console.log(`${r.numPassedTests} passed, ${r.numFailedTests} failed` + (skipped ? `, ${skipped} skipped` : ""));
  } catch { console.log("0 passed, 1 failed"); }
' "$ARTIFACTS/vitest.json")"
# Stop the stand-ins and the cluster first, so the runner's counts are the last line printed.
cleanup
echo "$summary"
exit $status
