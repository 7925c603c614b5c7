#!/usr/bin/env bash
# Environment for the local stand-ins of hosted services (sourced). $1 selects a port block: 87xx for start, 97xx for test.
# Real Google or Stripe is used unchanged when their credentials are already in the environment.
BASE="${1:-87}"
export SMTP_PORT="${BASE}25"
export MAIL_VIEWER_PORT="${BASE}82"
export MAIL_VIEWER_URL="http://127.0.0.1:${MAIL_VIEWER_PORT}"
export OAUTH_STANDIN_PORT="${BASE}81"
if [ -z "${GOOGLE_CLIENT_ID:-}" ]; then
  export GOOGLE_OAUTH_ISSUER="http://127.0.0.1:${OAUTH_STANDIN_PORT}"
  export GOOGLE_CLIENT_ID="thence-local-client"
  export GOOGLE_CLIENT_SECRET="thence-local-secret"
fi
export STRIPE_STANDIN_PORT="${BASE}12"
if [ -z "${STRIPE_SECRET_KEY:-}" ]; then
  export STRIPE_API_HOST="127.0.0.1"
  export STRIPE_API_PORT="$STRIPE_STANDIN_PORT"
  export STRIPE_API_PROTOCOL="http"
  export STRIPE_SECRET_KEY="sk_test_thence_local"
  export STRIPE_WEBHOOK_SECRET="whsec_thence_local"
fi
