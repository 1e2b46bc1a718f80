#!/usr/bin/env bash
# Set up everything Batten needs, on a fresh Debian machine or an existing one:
# the system libraries the window, its GL context and the virtual display need
# (apt, only where missing and only when run as root), then .venv at the repo
# root with Batten and its test tools installed. Safe to run again: it skips
# what is already done.
set -euo pipefail
cd "$(dirname "$0")/.."

APT_PACKAGES=(
  xvfb xauth libegl1 libgl1-mesa-dri libdbus-1-3 libfontconfig1 libglib2.0-0
  libxcb-cursor0 libxcb-icccm4 libxcb-image0 libxcb-keysyms1 libxcb-render-util0
  libxcb-render0 libxcb-shape0 libxcb-util1 libxcb-xkb1 libxkbcommon-x11-0
  libxkbcommon0 poppler-utils
)

missing=()
if command -v dpkg-query >/dev/null 2>&1; then
  for pkg in "${APT_PACKAGES[@]}"; do
    dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
  done
fi
if [ ${#missing[@]} -gt 0 ]; then
  if [ "$(id -u)" = 0 ]; then
    echo "setup: installing system packages: ${missing[*]}" >&2
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
  else
    echo "setup: missing system packages (install them as root): ${missing[*]}" >&2
  fi
fi

PYTHON=${PYTHON:-}
if [ -z "$PYTHON" ]; then
  for candidate in python3.11 python3; do
    if command -v "$candidate" >/dev/null 2>&1; then PYTHON=$candidate; break; fi
  done
fi
[ -x .venv/bin/python ] || "$PYTHON" -m venv .venv

# Reinstall only when the dependency list changed.
stamp=.venv/.batten-installed
want=$(sha256sum pyproject.toml | cut -d' ' -f1)
if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
  echo "setup: installing Python packages into .venv" >&2
  .venv/bin/python -m pip install -q --upgrade pip
  .venv/bin/python -m pip install -q -e ".[test]"
  echo "$want" > "$stamp"
fi
