#!/bin/bash
# Installs the real editor used by the editor tests: npm code-server@4.100.3 (bundles VS Code
# 1.100.3, runs on Node 20) plus Debian chromium, into a cache folder outside node_modules so a
# plain `npm ci` stays light. Idempotent: does nothing when the pinned version is already present.
# Usage: scripts/editor/installCodeServer.sh [cacheDir]   (default: <repo>/.cache/code-server)
set -euo pipefail
REPO_DIR=$(cd "$(dirname "$0")/../.." && pwd)
CACHE_DIR=${1:-${CODE_SERVER_DIR:-$REPO_DIR/.cache/code-server}}
VERSION=4.100.3
BIN="$CACHE_DIR/node_modules/.bin/code-server"

needApt=()
command -v chromium >/dev/null 2>&1 || needApt+=(chromium)
dpkg -s libkrb5-dev >/dev/null 2>&1 || needApt+=(libkrb5-dev)
dpkg -s pkg-config >/dev/null 2>&1 || needApt+=(pkg-config)
dpkg -s build-essential >/dev/null 2>&1 || needApt+=(build-essential)
command -v python3 >/dev/null 2>&1 || needApt+=(python3)
if [ ${#needApt[@]} -gt 0 ]; then
  if [ "$(id -u)" != 0 ]; then
    echo "missing Debian packages: ${needApt[*]} (run: sudo apt-get install ${needApt[*]})" >&2
    exit 1
  fi
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${needApt[@]}" >/dev/null
fi

if [ -x "$BIN" ] && grep -q "\"version\": \"$VERSION\"" "$CACHE_DIR/node_modules/code-server/package.json" 2>/dev/null; then
  echo "code-server $VERSION already installed in $CACHE_DIR"
  exit 0
fi

mkdir -p "$CACHE_DIR"
cd "$CACHE_DIR"
[ -f package.json ] || echo '{"name":"editor-test-cache","private":true}' > package.json

# code-server pins @vscode/ripgrep 1.15.11 whose postinstall downloads rg from the internet; it
# first looks in $TMPDIR/vscode-ripgrep-cache-1.15.11/, so seed that from the npm package
# @vscode/ripgrep-linux-x64, which ships the binary inside its registry tarball.
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT
(cd "$WORK" && npm pack @vscode/ripgrep-linux-x64@1.18.0 >/dev/null 2>&1 && tar xzf vscode-ripgrep-linux-x64-1.18.0.tgz)
RG_CACHE=${TMPDIR:-/tmp}/vscode-ripgrep-cache-1.15.11
mkdir -p "$RG_CACHE"
tar czf "$RG_CACHE/ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz" -C "$WORK/package/bin" rg

# unsafe_perm: code-server's postinstall refuses to run as root without it.
# yes: node-pty's postinstall runs `npx node-gyp`, which would otherwise wait for a confirmation.
npm_config_unsafe_perm=true npm_config_yes=true npm install "code-server@$VERSION" --no-audit --no-fund --foreground-scripts
echo "installed code-server $VERSION into $CACHE_DIR"
