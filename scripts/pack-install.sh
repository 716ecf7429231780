#!/bin/sh
# The local equivalent of `npm install schema-strata`: pack the workspace's packages (pnpm pack
# turns workspace: ranges into versions) and install them with npm into DIR (default
# ./schema-strata-install); then DIR/node_modules/.bin/schema-strata is the CLI with every adapter.
set -eu
cd "$(dirname "$0")/.."
dest="$(mkdir -p "${1:-schema-strata-install}" && cd "${1:-schema-strata-install}" && pwd)"
packs="$(mktemp -d)"
for p in packages/*/; do (cd "$p" && npx --yes pnpm@10 pack --pack-destination "$packs" >/dev/null); done
[ -f "$dest/package.json" ] || echo '{ "name": "schema-strata-install", "private": true }' > "$dest/package.json"
(cd "$dest" && npm install --no-audit --no-fund "$packs"/*.tgz)
rm -rf "$packs"
echo "installed: $dest/node_modules/.bin/schema-strata"
