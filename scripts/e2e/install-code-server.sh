#!/bin/sh
# Installs code-server 4.100.3 (VS Code 1.100.3, the last line that runs on Node 20) from the npm
# registry into DIR, without any download from GitHub. Same steps as the machine recipe in
# ../shared/editor-e2e/install-code-server.sh (copied here so the repository does not depend on
# that sibling folder existing). Needs apt: build-essential, python3, libkrb5-dev, ripgrep.
# Idempotent: exits early when DIR already holds a working install.
set -eu
DIR=${1:?usage: install-code-server.sh DIR}
VERSION=4.100.3
if [ -x "$DIR/node_modules/.bin/code-server" ] && [ -f "$DIR/.ferrule-complete" ]; then
  echo "code-server already installed in $DIR"
  exit 0
fi
mkdir -p "$DIR" && cd "$DIR"
[ -f package.json ] || npm init -y >/dev/null
export npm_config_nodedir=/usr          # use /usr/include/node headers; node-gyp would otherwise download them
# 1. the top-level package without its scripts (postinstall refuses root and downloads ripgrep from GitHub)
npm i "code-server@$VERSION" --ignore-scripts --no-audit --no-fund
npm rebuild argon2                       # prebuilt fetch fails offline; falls back to a local build
# 2. what code-server's postinstall does for the bundled VS Code, minus the GitHub download
cd node_modules/code-server/lib/vscode
npm install --omit=dev --ignore-scripts --no-audit --no-fund
npm rebuild kerberos @vscode/deviceid @vscode/spdlog native-watchdog node-pty || true  # node-pty's last step needs the network; pty.node is built before it
test -f node_modules/node-pty/build/Release/pty.node
test -f node_modules/kerberos/build/Release/kerberos.node
mkdir -p node_modules/@vscode/ripgrep/bin && cp "$(command -v rg)" node_modules/@vscode/ripgrep/bin/rg
ln -sfn node_modules node_modules.asar
(cd bin/remote-cli && ln -sfn code-linux.sh code-server)
(cd bin/helpers && ln -sfn browser-linux.sh browser.sh)
(cd extensions && npm install --omit=dev --no-audit --no-fund)
touch "$DIR/.ferrule-complete"
echo "code-server installed: $("$DIR/node_modules/.bin/code-server" --version 2>/dev/null | tail -1)"
