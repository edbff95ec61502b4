#!/usr/bin/env bash
# Sets up everything Sectionwright needs on Debian 12 (as root), idempotently:
# QGIS 3.22 and friends from Debian, a venv at .venv with the pinned Python
# packages. Quick when already done. Sourced by demo.sh and test.sh.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
APT_PACKAGES=(python3-qgis qgis-providers qgis python3-venv python3-pip python3-scipy
              poppler-utils)

missing=()
for package in "${APT_PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" \
    || missing+=("$package")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing ${missing[*]} from Debian"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -q
  apt-get install -y -q --no-install-recommends "${missing[@]}"
fi

VENV="$ROOT/.venv"
STAMP="$VENV/.requirements.sha256"
wanted="$(sha256sum "$ROOT/requirements-dev.txt" | cut -d' ' -f1)"
if [ ! -x "$VENV/bin/python" ]; then
  echo "setup: creating $VENV"
  /usr/bin/python3 -m venv --system-site-packages "$VENV"
fi
if [ "$(cat "$STAMP" 2>/dev/null)" != "$wanted" ]; then
  echo "setup: installing Python packages"
  "$VENV/bin/python" -m pip install -q --disable-pip-version-check -r "$ROOT/requirements-dev.txt"
  echo "$wanted" > "$STAMP"
fi

export QT_QPA_PLATFORM=offscreen
export PROJ_DATA=/usr/share/proj
export XDG_RUNTIME_DIR="${XDG_RUNTIME_DIR:-/tmp/runtime-$(id -u)}"
mkdir -p "$XDG_RUNTIME_DIR" && chmod 700 "$XDG_RUNTIME_DIR"
PYTHON="$VENV/bin/python"
SITE_PACKAGES="$("$PYTHON" -c 'import sysconfig; print(sysconfig.get_paths()["purelib"])')"
export PYTHON SITE_PACKAGES ROOT
