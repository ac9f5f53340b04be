#!/usr/bin/env bash
# Build Tidewell into dist/ and serve it on http://127.0.0.1:PORT (default 8000).
# Usage: bash tools/serve.sh [--port N]
set -euo pipefail
cd "$(dirname "$0")/.."
. tools/common.sh
command -v npm >/dev/null && command -v pip3 >/dev/null || tidewell_apt_install npm python3-pip
py=$(tidewell_python)
exec "$py" build.py serve "$@"
