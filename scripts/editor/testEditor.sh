#!/bin/bash
# Entry of `npm run test:editor`: install the real editor if missing (needs the npm registry and
# Debian packages), build, then run the editor tests with only loopback networking when the
# kernel lets us create a network namespace (nothing the editor does can leave the machine).
set -euo pipefail
cd "$(dirname "$0")/../.."
bash scripts/editor/installCodeServer.sh
mkdir -p test/artifacts
node esbuild.mjs
RUN="node_modules/.bin/tsx scripts/editor/runEditorTests.ts"
if [ -z "${NO_UNSHARE:-}" ] && unshare -n true 2>/dev/null; then
  exec unshare -n sh -c "ip link set lo up && exec $RUN"
fi
echo "network namespaces unavailable; running with the normal network (requests off loopback are still blocked in the browser)"
exec $RUN
