#!/usr/bin/env bash
# Set up everything Calorun needs on a fresh Debian/Ubuntu machine: the system libraries
# Qt needs offscreen (installed with apt-get when running as root and missing), a virtual
# environment in .venv, and the package with its test extra. Safe to run again: it skips
# what is already done.
set -euo pipefail
cd "$(dirname "$0")/.."

SYSTEM_PACKAGES="libgl1 libegl1 libxkbcommon0 libglib2.0-0 libfontconfig1 libdbus-1-3 fonts-dejavu-core poppler-utils"
missing=""
if command -v dpkg-query >/dev/null 2>&1; then
  for pkg in $SYSTEM_PACKAGES; do
    dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing="$missing $pkg"
  done
fi
if [ -n "$missing" ]; then
  if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
    echo "setup: installing system packages:$missing"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq --no-install-recommends $missing >/dev/null
  else
    echo "setup: these system packages are missing (install them with your package manager):$missing" >&2
  fi
fi

PYTHON="${PYTHON:-python3}"
if [ ! -x .venv/bin/python ]; then
  echo "setup: creating .venv"
  "$PYTHON" -m venv .venv
fi
stamp=".venv/.calorun-installed"
want="$(sha256sum pyproject.toml | cut -d' ' -f1)"
if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
  echo "setup: installing Calorun and its dependencies into .venv"
  .venv/bin/python -m pip install -q --upgrade pip
  .venv/bin/python -m pip install -q -e ".[test]"
  echo "$want" > "$stamp"
fi
