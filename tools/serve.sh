#!/usr/bin/env bash
# Build Tidewell into dist/ and serve it on http://127.0.0.1:PORT (default 8000).
# Usage: bash tools/serve.sh [--port N]
set -euo pipefail
cd "$(dirname "$0")/.."
. tools/common.sh
tidewell_apt_install npm:npm
py=$(tidewell_python)
"$py" -m pip --version >/dev/null 2>&1 || tidewell_apt_install python3-pip:pip3
exec "$py" build.py serve "$@"
