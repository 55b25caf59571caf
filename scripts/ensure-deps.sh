#!/usr/bin/env bash
# Installs npm packages when node_modules is missing or older than the lock file.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "Installing npm packages (npm ci)..." >&2
  npm ci --no-audit --no-fund >&2
fi
