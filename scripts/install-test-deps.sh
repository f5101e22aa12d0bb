#!/usr/bin/env bash
# Installs what the webview tests need on a fresh Debian machine: Debian's Chromium, driven by
# playwright-core (an npm dev dependency, installed by `npm ci`). Idempotent: does nothing when present.
# Run as root (CI) or with sudo.
set -euo pipefail
export DEBIAN_FRONTEND=noninteractive
if [ -x /usr/bin/chromium ]; then
  echo "chromium already installed: $(/usr/bin/chromium --version 2>/dev/null || echo unknown version)"
  exit 0
fi
SUDO=""
if [ "$(id -u)" -ne 0 ]; then
  if command -v sudo >/dev/null 2>&1; then SUDO="sudo"; else echo "install-test-deps: need root to install chromium" >&2; exit 1; fi
fi
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq chromium
/usr/bin/chromium --version || true
