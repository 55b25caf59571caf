#!/usr/bin/env bash
# Browser tests drive Debian's chromium through playwright-core; never a browser download.
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then exit 0; fi
if [ "$(id -u)" -ne 0 ]; then
  echo "chromium is missing: install the Debian package 'chromium' (as root: apt-get install -y chromium)" >&2
  exit 1
fi
echo "Installing chromium from Debian's packages..." >&2
DEBIAN_FRONTEND=noninteractive apt-get update -qq >&2
DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >&2
