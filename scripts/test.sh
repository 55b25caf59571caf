#!/usr/bin/env bash
# npm test: everything a reviewer would run, on a fresh machine: type checks, unit and integration tests
# against a separate test database, the Angular component tests, and the browser tests.
# PROOFLINE_SKIP_BROWSER=1 skips the browser tests locally; CI never sets it.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
bash scripts/ensure-deps.sh
source scripts/db.sh
db_start proofline_test proofline_e2e
export DATABASE_URL="$DB_BASE_URL/proofline_test"
export E2E_DATABASE_URL="$DB_BASE_URL/proofline_e2e"
export NODE_ENV=test

echo "== type check (server, solver, shared, tests)"
npx tsc -p tsconfig.node.json
echo "== client production build (type checks the Angular app)"
npx ng build --configuration production
echo "== unit and integration tests (vitest)"
npx vitest run
echo "== Angular component tests"
npx ng test --watch=false
if [ "${PROOFLINE_SKIP_BROWSER:-}" = "1" ] && [ "${CI:-}" != "true" ]; then
  echo "== browser tests skipped (PROOFLINE_SKIP_BROWSER=1)"
else
  bash scripts/ensure-chromium.sh
  echo "== browser tests"
  npx vitest run --config tests/e2e/vitest.e2e.config.ts
fi
