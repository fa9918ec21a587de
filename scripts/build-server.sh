#!/usr/bin/env bash
# The server as production runs it: TypeScript compiled by tsc into plain JavaScript that `node`
# starts without a loader. $1 is the output folder (default dist-server/); npm test builds its own.
set -euo pipefail
cd "$(dirname "$0")/.."
out="${1:-dist-server}"
rm -rf "$out"
node_modules/.bin/tsc -p server/tsconfig.build.json --outDir "$out"
# The sources import without file endings (as Vite and tsx allow); Node's ES module loader needs
# them spelled out, so tsc-alias writes ".js" (or "/index.js") into every relative import it can resolve.
node_modules/.bin/tsc-alias -p server/tsconfig.build.json --outDir "$out"
# Files the server reads beside its code at run time.
mkdir -p "$out/server/security"
cp server/security/common-passwords.txt "$out/server/security/"
# An import left without an ending would only fail when that module is first loaded: refuse now.
if grep -rEn "(from|import\() *'\.{1,2}/[^']*'" "$out" --include=*.js | grep -vE "\.js'" ; then
  echo "build-server: the imports above were not resolved to files" >&2
  exit 1
fi
echo "build-server: compiled the server into $out/"
