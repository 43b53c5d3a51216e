#!/usr/bin/env bash
# Installs code-server 4.100.3 (VS Code 1.100.3's server and web workbench) into the
# git-ignored folder .e2e/cs of the repository, for the extension-host and whole-editor
# tests (see docs/testing.md, "Offline workbench"). Works offline apart from the npm registry
# and Debian's repositories. Does nothing when the right version is already there.
set -euo pipefail

VERSION=4.100.3
RG_CACHE_VERSION=1.15.11
RG_ASSET=ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
E2E="$ROOT/.e2e"
CS="$E2E/cs"

installed_version() {
  node -e 'try{process.stdout.write(require(process.argv[1]).version)}catch{}' "$CS/node_modules/code-server/package.json"
}

if [ "$(installed_version)" = "$VERSION" ] && [ -x "$CS/node_modules/code-server/out/node/entry.js" -o -f "$CS/node_modules/code-server/out/node/entry.js" ]; then
  echo "code-server $VERSION already installed in .e2e/cs"
  exit 0
fi

# Debian packages the native addons need (kerberos headers, node-gyp's toolchain).
missing=()
for p in libkrb5-dev python3 make g++; do
  dpkg -s "$p" >/dev/null 2>&1 || missing+=("$p")
done
if [ "${#missing[@]}" -gt 0 ]; then
  echo "installing Debian packages: ${missing[*]}"
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}"
fi

mkdir -p "$CS" "$E2E/tmp"
# Keep every temporary and cache file inside .e2e; @vscode/ripgrep looks for its cache in os.tmpdir().
export TMPDIR="$E2E/tmp"
export npm_config_cache="$E2E/npm-cache"
# node-gyp uses the local Node headers instead of downloading them.
export npm_config_nodedir="$(dirname "$(dirname "$(command -v node)")")"
export npm_config_yes=true
export npm_config_fund=false
export npm_config_audit=false
export npm_config_update_notifier=false

# @vscode/ripgrep's install step downloads ripgrep from outside the npm registry unless its
# cache already holds the archive: build that archive from the registry package's binary.
RG_DIR="$TMPDIR/vscode-ripgrep-cache-$RG_CACHE_VERSION"
if [ ! -f "$RG_DIR/$RG_ASSET" ]; then
  work="$(mktemp -d "$TMPDIR/rg.XXXXXX")"
  (cd "$work" && npm pack --silent @vscode/ripgrep-linux-x64 >/dev/null && tar -xzf ./*.tgz)
  mkdir -p "$RG_DIR"
  chmod +x "$work/package/bin/rg"
  tar -czf "$RG_DIR/$RG_ASSET" -C "$work/package/bin" rg
  rm -rf "$work"
fi

cd "$CS"
[ -f package.json ] || printf '{ "name": "knotwise-e2e-workbench", "private": true }\n' > package.json
echo "installing code-server $VERSION into .e2e/cs (takes a few minutes)"
npm install --unsafe-perm=true --loglevel=error "code-server@$VERSION"

if [ "$(installed_version)" != "$VERSION" ]; then
  echo "code-server $VERSION did not install" >&2
  exit 1
fi
echo "code-server $VERSION installed in .e2e/cs"
