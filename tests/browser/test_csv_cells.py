"""CSV cells of the case-log export (webshell/js/caselog.js ``csvCell``), each escaping rule on its own.

The function's own source is cut from caselog.js and run under node (no browser): a cell a spreadsheet
would read as a formula (leading = + - @, tab or carriage return) gets a leading apostrophe (OWASP CSV
injection advice, common practice); a cell with a quote, comma or line break is quoted, quotes doubled
(RFC 4180). test_caselog.py checks one formula label through the real export in the browser.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

SOURCE = Path(__file__).resolve().parents[2] / "webshell" / "js" / "caselog.js"

CELLS = [
    ("=SUM(A1:A9)", "'=SUM(A1:A9)"),
    ("+1", "'+1"),
    ("-2", "'-2"),
    ("@cmd", "'@cmd"),
    ("\tx", "'\tx"),
    ("\rx", '"\'\rx"'),
    ("a=b", "a=b"),
    ("plain", "plain"),
    ('say "hi", then', '"say ""hi"", then"'),
    ("=a,b", '"\'=a,b"'),
    (None, ""),
    (7.3, "7.3"),
]


@pytest.fixture(scope="module")
def cells() -> list[str]:
    node = shutil.which("node")
    assert node, "node is needed (build.py uses it too)"
    found = re.search(r"const csvCell = \(v\) => \{.*?\n\};\n", SOURCE.read_text(encoding="utf-8"), re.S)
    assert found, "csvCell not found in caselog.js"
    script = (
        found.group(0) + f"console.log(JSON.stringify({json.dumps([c for c, _ in CELLS])}.map(csvCell)));"
    )
    run = subprocess.run([node, "-e", script], capture_output=True, text=True, timeout=60, check=True)
    return json.loads(run.stdout)


@pytest.mark.parametrize(("i", "want"), [(i, want) for i, (_, want) in enumerate(CELLS)])
def test_cell(cells, i, want):
    assert cells[i] == want, CELLS[i][0]
