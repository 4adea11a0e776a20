#!/usr/bin/env bash
# Test set-up for the preview-page browser check: Chromium from Debian's packages.
# Idempotent; exits 0 when a chromium binary is available afterwards.
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then exit 0; fi
if ! command -v apt-get >/dev/null 2>&1; then echo "apt-get is not available" >&2; exit 3; fi
SUDO=""
if [ "$(id -u)" != "0" ]; then
  if command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then SUDO="sudo -n"; else
    echo "not root and no password-less sudo" >&2; exit 3; fi
fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq chromium
command -v chromium >/dev/null 2>&1
