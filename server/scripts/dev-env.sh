#!/usr/bin/env bash
# Prints the environment of the test set-up (cluster must exist: run `npm test` once) for running single test files:
#   eval "$(bash server/scripts/dev-env.sh)" && npx vitest run tests/api/auth.test.ts
source "$(dirname "$0")/env.sh" >/dev/null
source "$(dirname "$0")/fakes-env.sh" 97
start_cluster >&2
ensure_database thence_test
env | grep -E '^(DATABASE_URL|PGPORT|PGPASSWORD|SMTP_PORT|MAIL_VIEWER_|OAUTH_STANDIN_PORT|GOOGLE_|STRIPE_)' | sed 's/^/export /; s/=\(.*\)$/="\1"/'
echo 'export NODE_ENV=test THENCE_DATA_DIR=.data/test'
