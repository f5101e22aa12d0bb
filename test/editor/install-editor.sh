#!/usr/bin/env bash
# Installs what the real-editor tests need, once, outside the project's dependencies:
#   - Debian packages: chromium (the browser that drives the editor), libkrb5-dev (a native module of the
#     VS Code build compiles against it), ripgrep (stands in for the ripgrep download the build cannot make here);
#   - node-gyp (a post-install step of the VS Code build calls `npx node-gyp`);
#   - code-server 4.100.3 (a full VS Code 1.100.3 build: server + web workbench) into
#     $VALLEYSCOPE_EDITOR_HOME (default $HOME/.cache/valleyscope-editor), reinstalled only when missing.
# Idempotent: a second run with everything present does nothing but check. Prints the code-server entry
# point on its last line. Exit status non-zero when something could not be installed.
set -euo pipefail

CODE_SERVER_VERSION=4.100.3
EDITOR_HOME="${VALLEYSCOPE_EDITOR_HOME:-$HOME/.cache/valleyscope-editor}"
INSTALL_DIR="$EDITOR_HOME/code-server-$CODE_SERVER_VERSION"
ENTRY="$INSTALL_DIR/node_modules/code-server/out/node/entry.js"
VSCODE_DIR="$INSTALL_DIR/node_modules/code-server/lib/vscode"
export DEBIAN_FRONTEND=noninteractive

log() { echo "[install-editor] $*" >&2; }

# npm 11 runs no dependency install script unless a policy allows it. These must run: code-server's own
# post-install (it installs the VS Code build's dependencies with nested `npm install`s in lib/vscode and
# lib/vscode/extensions) and the native modules / ripgrep download of that build. Versions are the ones pinned
# by code-server 4.100.3's npm-shrinkwrap.json files; every other install script stays blocked.
TOP_ALLOWED=("code-server@$CODE_SERVER_VERSION" "argon2@0.31.2")
VSCODE_ALLOWED=(
  "@parcel/watcher@2.5.1"
  "@vscode/deviceid@0.1.1"
  "@vscode/ripgrep@1.15.11"
  "@vscode/spdlog@0.15.1"
  "@vscode/windows-process-tree@0.6.0"
  "@vscode/windows-registry@1.1.0"
  "kerberos@2.1.1"
  "native-watchdog@1.4.2"
  "node-pty@1.1.0-beta33"
)

# ---- 1. Debian packages -------------------------------------------------------------------------------
need=()
command -v chromium >/dev/null 2>&1 || need+=(chromium)
command -v rg >/dev/null 2>&1 || need+=(ripgrep)
dpkg -s libkrb5-dev >/dev/null 2>&1 || need+=(libkrb5-dev)
command -v make >/dev/null 2>&1 || need+=(make)
command -v g++ >/dev/null 2>&1 || need+=(g++)
command -v python3 >/dev/null 2>&1 || need+=(python3)
if [ ${#need[@]} -gt 0 ]; then
  log "installing Debian packages: ${need[*]}"
  # Wait for another apt run on this machine instead of failing on its lock.
  apt-get -o DPkg::Lock::Timeout=900 update -qq
  apt-get -o DPkg::Lock::Timeout=900 install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi

# ---- 2. node-gyp --------------------------------------------------------------------------------------
if ! command -v node-gyp >/dev/null 2>&1; then
  log "installing node-gyp (global)"
  npm install -g --no-audit --no-fund node-gyp >/dev/null
fi

# ---- 3. the ripgrep cache the VS Code build's ripgrep package looks in before downloading ---------------
RG_CACHE_DIR="${TMPDIR:-/tmp}/vscode-ripgrep-cache-1.15.11"
RG_TARBALL="$RG_CACHE_DIR/ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz"
if [ ! -s "$RG_TARBALL" ]; then
  log "placing Debian's ripgrep where the VS Code build looks for its download"
  mkdir -p "$RG_CACHE_DIR"
  tmp=$(mktemp -d)
  cp "$(command -v rg)" "$tmp/rg"
  tar -czf "$RG_TARBALL" -C "$tmp" rg
  rm -rf "$tmp"
fi

# ---- 4. code-server ---------------------------------------------------------------------------------------
installed_files_ok() {
  [ -f "$ENTRY" ] &&
    [ -f "$VSCODE_DIR/out/server-main.js" ] &&
    [ -x "$VSCODE_DIR/node_modules/@vscode/ripgrep/bin/rg" ] &&
    [ -n "$(find "$VSCODE_DIR/node_modules/@vscode/spdlog/build" -name '*.node' 2>/dev/null | head -1)" ] &&
    [ -n "$(find "$VSCODE_DIR/node_modules/node-pty/build" -name '*.node' 2>/dev/null | head -1)" ]
}
installed_ok() { [ -f "$INSTALL_DIR/.valleyscope-install-complete" ] && installed_files_ok; }

if ! installed_ok; then
  log "installing code-server $CODE_SERVER_VERSION into $INSTALL_DIR (a few minutes, once)"
  rm -rf "$INSTALL_DIR"
  mkdir -p "$INSTALL_DIR"
  LOG="$INSTALL_DIR/install.log"
  fail() { log "$1; the last lines of $LOG:"; tail -40 "$LOG" >&2; exit 1; }
  # The policy of this folder: package.json "allowScripts" (a package field, so npm does not pass it on to
  # the nested installs, where a command-line/env allow list is refused).
  node -e '
    const allow = Object.fromEntries(process.argv.slice(1).map((s) => [s, true]));
    console.log(JSON.stringify({ name: "valleyscope-editor-under-test", private: true,
      description: "code-server for the Valleyscope editor tests; not part of the extension",
      allowScripts: allow }, null, 2));' "${TOP_ALLOWED[@]}" >"$INSTALL_DIR/package.json"
  # Step 1: fetch the tree without running any script, so the nested folders' policy can be put in place first.
  ( cd "$INSTALL_DIR" && npm install --no-audit --no-fund --ignore-scripts --omit-lockfile-registry-resolved=false \
      "code-server@$CODE_SERVER_VERSION" ) >"$LOG" 2>&1 || fail "npm install of code-server failed"
  # Step 2: the nested installs' policy, as project .npmrc files (nodedir: build native modules against the
  # local Node headers, no header download).
  for d in "$VSCODE_DIR" "$VSCODE_DIR/extensions"; do
    { for s in "${VSCODE_ALLOWED[@]}"; do echo "allow-scripts=$s"; done
      [ -d /usr/include/node ] && echo "nodedir=/usr" || true
      echo "omit-lockfile-registry-resolved=false"
    } >"$d/.npmrc"
  done
  # Step 3: run the allowed install scripts (code-server's post-install builds the VS Code dependencies).
  # (npm_config_nodedir: native modules build against the local Node headers; there is no header download.)
  nodedir_env=()
  [ -d /usr/include/node ] && nodedir_env=(npm_config_nodedir=/usr)
  ( cd "$INSTALL_DIR" && env "${nodedir_env[@]}" npm_config_unsafe_perm=true npm_config_yes=true \
      npm rebuild --foreground-scripts --omit-lockfile-registry-resolved=false ) >>"$LOG" 2>&1 \
    || fail "code-server's install scripts failed"
  if ! installed_files_ok; then
    grep -iE 'allowScripts|not allowed|blocked' "$LOG" >&2 || true
    fail "code-server installed but parts are missing (native modules or ripgrep)"
  fi
  touch "$INSTALL_DIR/.valleyscope-install-complete"
fi

# ---- 5. it starts ------------------------------------------------------------------------------------
# (its own config folder, so the check writes no default config into the user's home)
version=$(XDG_CONFIG_HOME="$EDITOR_HOME/config" XDG_DATA_HOME="$EDITOR_HOME/data" node "$ENTRY" --version 2>/dev/null \
  | grep -E '^[0-9]+\.[0-9]+\.[0-9]+ ' | head -1 || true)
case "$version" in
  "$CODE_SERVER_VERSION"*) ;;
  *) log "code-server does not start (--version printed: '$version')"; exit 1 ;;
esac
log "code-server $version ready"
echo "$ENTRY"
