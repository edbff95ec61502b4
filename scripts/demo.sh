#!/usr/bin/env bash
# Sets up (see setup.sh) and runs the main job on the bundled demo world:
# every algorithm headless on every demo section, then the section sheets
# (PDF) and a QGIS project with the map, the section views and the layouts.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh"
cd "$ROOT"
OUT="${1:-$ROOT/demo}"
"$PYTHON" scripts/run_demo.py "$OUT"
"$PYTHON" scripts/make_demo_project.py "$OUT" 2> >(grep -v -e "^Warning" -e "unable to open database file" -e "ExecuteSQL" >&2)
