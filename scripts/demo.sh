#!/usr/bin/env bash
# Sets up (see setup.sh) and runs the main job on the bundled demo world.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh"
cd "$ROOT"
exec "$PYTHON" scripts/run_demo.py "$@"
