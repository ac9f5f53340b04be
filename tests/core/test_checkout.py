"""The tests test this checkout's core, whatever other copy of tidewell is installed.

tests/conftest.py puts ROOT/core first on sys.path before anything imports tidewell, and pyproject.toml's
``pythonpath = ["core"]`` does the same for a run that starts in core/. Here: the modules loaded come from
this checkout, and a run with a decoy copy of tidewell ahead on PYTHONPATH still collects and tests this one.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import tidewell

ROOT = Path(__file__).resolve().parents[2]
CORE = ROOT / "core"


def test_tidewell_is_this_checkouts():
    assert Path(tidewell.__file__).resolve().is_relative_to(CORE), tidewell.__file__
    loaded = {name: m for name, m in sys.modules.items() if name.split(".")[0] == "tidewell"}
    elsewhere = [n for n, m in loaded.items() if not Path(m.__file__).resolve().is_relative_to(CORE)]
    assert not elsewhere, elsewhere


def test_a_decoy_copy_ahead_on_the_path_is_not_tested(tmp_path):
    # a decoy tidewell first on PYTHONPATH, as another clone installed with ``pip install -e`` would be
    decoy = tmp_path / "tidewell"
    decoy.mkdir()
    (decoy / "__init__.py").write_text('__version__ = "decoy"\n', encoding="utf-8")
    (decoy / "units.py").write_text("", encoding="utf-8")
    env = {**os.environ, "PYTHONPATH": str(tmp_path), "PYTHONDONTWRITEBYTECODE": "1"}
    here = "tests/core/test_checkout.py::test_tidewell_is_this_checkouts"
    run = subprocess.run(
        [sys.executable, "-m", "pytest", "core", here, "--doctest-modules", "-q", "-p", "no:cacheprovider"],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )
    out = run.stdout + run.stderr
    assert run.returncode == 0, out[-3000:]
    assert "mismatch" not in out.lower(), out[-3000:]
    assert " passed" in out and " failed" not in out and " error" not in out, out[-3000:]
