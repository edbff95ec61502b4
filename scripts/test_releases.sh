#!/usr/bin/env bash
# Runs the whole test suite on other QGIS releases, each inside a Debian root
# (debootstrap, minbase) with that release's own packages:
#   trixie  -> QGIS 3.40 LTR (Python 3.13, numpy 2, shapely 2.1)
#   forky   -> QGIS 3.44
#   newest-shapely -> the headless (qgis_process) tests, marked `headless`, in
#              the trixie root with the newest shapely on PyPI that the
#              root's numpy allows, installed into a folder of its own
#              (Debian's python3-shapely stays) and put first on PYTHONPATH;
#              then the same on this machine (QGIS 3.22, GEOS 3.11), where
#              a GEOS older than the wheel's shows what shapely leaves to
#              GEOS. The versions are printed at the start.
# Usage: bash scripts/test_releases.sh [trixie] [forky] [newest-shapely] [-- pytest arguments]
# Roots are cached in $SECTIONWRIGHT_ROOTS (default /var/cache/sectionwright-roots)
# and rebuilt when missing or when the package list below changes. Needs root.
set -euo pipefail
CHECKOUT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
CACHE="${SECTIONWRIGHT_ROOTS:-/var/cache/sectionwright-roots}"
MIRROR="${SECTIONWRIGHT_MIRROR:-http://deb.debian.org/debian}"
PACKAGES=(python3-qgis qgis-providers qgis python3-pytest python3-shapely python3-pyproj
          python3-scipy python3-hypothesis python3-numpy python3-gdal python3-pip
          poppler-utils ca-certificates)
PIP_PACKAGES=(pytest-qgis==5.0.2)
STAMP="$(printf '%s\n' "${PACKAGES[@]}" "${PIP_PACKAGES[@]}" | sha256sum | cut -d' ' -f1)"

suites=()
while [ $# -gt 0 ] && [ "$1" != "--" ]; do suites+=("$1"); shift; done
[ "${1:-}" = "--" ] && shift
[ ${#suites[@]} -gt 0 ] || suites=(trixie forky newest-shapely)

if ! command -v debootstrap >/dev/null; then
  DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends debootstrap
fi

in_root() {   # in_root DIR COMMAND… : run inside the root with a clean environment
  local dir="$1"; shift
  chroot "$dir" /usr/bin/env -i HOME=/root LANG=C.UTF-8 DEBIAN_FRONTEND=noninteractive \
    PATH=/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin "$@"
}

mount_root() {
  local dir="$1"
  mkdir -p "$dir/checkout"
  mountpoint -q "$dir/proc" || mount -t proc proc "$dir/proc"
  mountpoint -q "$dir/dev" || mount --bind /dev "$dir/dev"
  mountpoint -q "$dir/checkout" || mount --bind "$CHECKOUT" "$dir/checkout"
  cp /etc/resolv.conf "$dir/etc/resolv.conf"
}

unmount_root() {
  local dir="$1"
  for point in checkout dev proc; do
    mountpoint -q "$dir/$point" && umount -l "$dir/$point" || true
  done
}

build_root() {
  local suite="$1" dir="$CACHE/$1"
  if [ "$(cat "$dir/.sectionwright-ready" 2>/dev/null)" = "$STAMP" ]; then return; fi
  echo "test_releases: building the $suite root in $dir"
  rm -rf "$dir"
  mkdir -p "$CACHE"
  local script=()
  # Debian 12's debootstrap has no script for forky: sid's works.
  [ -e "/usr/share/debootstrap/scripts/$suite" ] || script=(/usr/share/debootstrap/scripts/sid)
  debootstrap --variant=minbase "$suite" "$dir" "$MIRROR" "${script[@]}" > "$CACHE/$suite.log" 2>&1 \
    || { tail -20 "$CACHE/$suite.log"; exit 1; }
  mount_root "$dir"
  trap 'unmount_root "'"$dir"'"' EXIT
  # Testing suites' Release files may be past their validity date.
  in_root "$dir" apt-get -q -o Acquire::Check-Valid-Until=false update
  in_root "$dir" apt-get install -y -q --no-install-recommends "${PACKAGES[@]}"
  # pip inside the root: the machine's CA bundle, none of its pip configuration.
  cp /etc/ssl/certs/ca-certificates.crt "$dir/etc/ssl/certs/host-ca-bundle.crt"
  in_root "$dir" env PIP_CONFIG_FILE=/dev/null PIP_CERT=/etc/ssl/certs/host-ca-bundle.crt \
    SSL_CERT_FILE=/etc/ssl/certs/host-ca-bundle.crt \
    python3 -m pip install -q --break-system-packages --no-deps "${PIP_PACKAGES[@]}"
  unmount_root "$dir"
  trap - EXIT
  echo "$STAMP" > "$dir/.sectionwright-ready"
}

# The environment of each leg's tests. On 3.44, the last 3.x, whose API QGIS 4
# continues, QGIS's own deprecation warnings are errors (tests/conftest.py).
leg_environment() {
  echo "SECTIONWRIGHT_RELEASE_LEG=$1"
  [ "$1" != forky ] || echo "SECTIONWRIGHT_QGIS_DEPRECATIONS=error"
}

run_leg() {
  local suite="$1" dir="$CACHE/$1"; shift
  mount_root "$dir"
  trap 'unmount_root "'"$dir"'"' EXIT
  local version
  version="$(in_root "$dir" python3 -c 'from qgis.core import Qgis; print(Qgis.QGIS_VERSION)')"
  echo "test_releases: $suite, QGIS $version"
  local started=$SECONDS status=0
  local leg_env
  mapfile -t leg_env < <(leg_environment "$suite")
  in_root "$dir" env QT_QPA_PLATFORM=offscreen XDG_RUNTIME_DIR=/tmp/runtime-root "${leg_env[@]}" \
    sh -c 'mkdir -p -m 700 /tmp/runtime-root && cd /checkout && exec python3 -m pytest -p no:cacheprovider "$@"' \
    pytest "$@" || status=$?
  echo "test_releases: $suite finished in $((SECONDS - started)) s with status $status"
  unmount_root "$dir"
  trap - EXIT
  return $status
}

# The newest-shapely leg, run by bash inside the environment tested (the
# trixie root, or this machine with the venv first on PATH):
#   newest_shapely_inside TARGET CHECKOUT [pytest arguments]
newest_shapely_inside() {
  set -e
  local target="$1" checkout="$2" numpy wanted
  shift 2
  numpy="$(python3 -c 'import numpy; print(numpy.__version__)')"
  # The newest shapely whose requirements this numpy meets; QGIS's numpy
  # (GDAL is built against it) is never replaced.
  wanted="$(python3 -m pip install -q --dry-run --ignore-installed --only-binary=:all: \
    --report - shapely "numpy==$numpy" | python3 -c '
import json, sys
report = json.load(sys.stdin)
print(next(p["metadata"]["version"] for p in report["install"]
           if p["metadata"]["name"].lower() == "shapely"))')"
  if [ "$(cat "$target/.version" 2>/dev/null)" != "$wanted" ]; then
    rm -rf "$target"
    python3 -m pip install -q --no-deps --only-binary=:all: --target "$target" "shapely==$wanted"
    echo "$wanted" > "$target/.version"
  fi
  export PYTHONPATH="$target" QT_QPA_PLATFORM=offscreen PROJ_DATA=/usr/share/proj
  export XDG_RUNTIME_DIR=/tmp/runtime-root
  mkdir -p -m 700 "$XDG_RUNTIME_DIR"
  python3 -c '
import os, numpy, shapely
from qgis.core import Qgis
print(f"test_releases: newest-shapely on QGIS {Qgis.QGIS_VERSION}: "
      f"shapely {shapely.__version__} (in {os.path.dirname(os.path.dirname(shapely.__file__))}, "
      f"built with GEOS {shapely.geos_version_string}), numpy {numpy.__version__}, "
      f"QGIS GEOS {Qgis.geosVersion()}")'
  cd "$checkout"
  python3 -m pytest -p no:cacheprovider -m headless "$@"
}

run_newest_shapely() {
  local dir="$CACHE/trixie" started=$SECONDS status=0
  local leg
  leg="$(declare -f newest_shapely_inside); newest_shapely_inside \"\$@\""
  build_root trixie
  mount_root "$dir"
  trap 'unmount_root "'"$dir"'"' EXIT
  in_root "$dir" env PIP_CONFIG_FILE=/dev/null PIP_DISABLE_PIP_VERSION_CHECK=1 PIP_ROOT_USER_ACTION=ignore \
    PIP_CERT=/etc/ssl/certs/host-ca-bundle.crt SSL_CERT_FILE=/etc/ssl/certs/host-ca-bundle.crt \
    bash -c "$leg" leg /opt/sectionwright-newest-shapely /checkout "$@" || status=$?
  unmount_root "$dir"
  trap - EXIT
  env PATH="$CHECKOUT/.venv/bin:$PATH" PIP_DISABLE_PIP_VERSION_CHECK=1 PIP_ROOT_USER_ACTION=ignore \
    bash -c "$leg" leg "$CACHE/bookworm-newest-shapely" "$CHECKOUT" "$@" || status=$?
  echo "test_releases: newest-shapely finished in $((SECONDS - started)) s with status $status"
  return $status
}

failed=0
for suite in "${suites[@]}"; do
  if [ "$suite" = newest-shapely ]; then
    run_newest_shapely "$@" || failed=1
    continue
  fi
  build_root "$suite"
  run_leg "$suite" "$@" || failed=1
done
exit $failed
