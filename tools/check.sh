#!/usr/bin/env bash
# Install everything the tests need, then run all of them: lint, core tests with doctests, build
# reproducibility, browser tests in headless Chromium, and each benchmark once in quick mode.
# Usage: bash tools/check.sh            (as root, or with sudo, on Debian/Ubuntu)
set -euo pipefail
cd "$(dirname "$0")/.."
. tools/common.sh
export SE_AVOID_STATS=true PIP_DISABLE_PIP_VERSION_CHECK=1

echo "== system packages"
tidewell_apt_install chromium:chromium chromium-driver:chromedriver npm:npm
py=$(tidewell_python)
"$py" -m pip --version >/dev/null 2>&1 || tidewell_apt_install python3-pip:pip3

echo "== python packages"
"$py" -m pip install -q -e '.[test,dev]'

echo "== lint"
"$py" -m ruff check .
"$py" -m ruff format --check .

echo "== core tests and doctests"
"$py" -m pytest core tests/core --doctest-modules -q -W error -p no:cacheprovider

echo "== browser tests (builds dist/ first)"
"$py" -m pytest tests/browser -q -p no:cacheprovider

if [ -d bench ]; then
    echo "== benchmarks, quick mode (they assert nothing about time)"
    for b in bench/*.py; do
        [ -f "$b" ] || continue
        echo "-- $b"
        "$py" "$b" --quick
    done
fi
echo "== all checks passed"
