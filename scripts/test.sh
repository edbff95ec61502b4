#!/usr/bin/env bash
# Sets up (see setup.sh) and runs the whole test suite. Extra arguments go to pytest.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh"
cd "$ROOT"
exec "$PYTHON" -m pytest "$@"
