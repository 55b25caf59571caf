#!/usr/bin/env bash
# npm start: installs what is missing, starts the private PostgreSQL, builds the client and serves
# Proofline (client + API) from one Express process. Migrations and the demo seed run at server start.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
bash scripts/ensure-deps.sh
source scripts/db.sh
db_start proofline
export DATABASE_URL="$DB_BASE_URL/proofline"
echo "Building the client..." >&2
npx ng build --configuration production >&2
exec node --import tsx server/main.ts
