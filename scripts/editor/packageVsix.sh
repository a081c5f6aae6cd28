#!/bin/bash
# `npm run package [-- <target>]`: a production build and a platform .vsix that ships only that
# platform's onnxruntime binaries. Targets: linux-x64 (default), linux-arm64, darwin-x64,
# darwin-arm64, win32-x64, win32-arm64 (docs/packaging.md).
set -euo pipefail
cd "$(dirname "$0")/../.."
TARGET=${1:-${VSIX_TARGET:-linux-x64}}
case "$TARGET" in
  linux-x64|linux-arm64|darwin-x64|darwin-arm64|win32-x64|win32-arm64) ;;
  *) echo "expected a target among linux-x64 linux-arm64 darwin-x64 darwin-arm64 win32-x64 win32-arm64, got '$TARGET'" >&2; exit 2 ;;
esac
OS=${TARGET%-*}
ARCH=${TARGET#*-}
BINDIR=node_modules/onnxruntime-node/bin/napi-v6/$OS/$ARCH
[ -d "$BINDIR" ] || { echo "expected onnxruntime binaries in $BINDIR, found none" >&2; exit 1; }

node esbuild.mjs --production
mkdir -p out
IGNORE=out/vscodeignore-$TARGET
# The committed .vscodeignore is the linux-x64 list; other targets swap the binary folder.
sed "s#napi-v6/linux/x64#napi-v6/$OS/$ARCH#" .vscodeignore > "$IGNORE"
VERSION=$(node -p "require('./package.json').version")
OUT=metric-triage-$TARGET-$VERSION.vsix
npx vsce package --target "$TARGET" --ignoreFile "$IGNORE" --out "$OUT" --skip-license --allow-missing-repository --no-rewrite-relative-links >/dev/null
SIZE=$(stat -c %s "$OUT")
echo "$OUT $((SIZE / 1024)) KiB"
npx vsce ls --ignoreFile "$IGNORE" --allow-missing-repository 2>/dev/null | sed 's#^#  #' | head -40 || true
