"""The service worker refuses a build whose file does not match its sha256 (sw.js, install).

A browser cannot be made to serve a wrong file to the service worker's own install without a proxy, so
the install handler of webshell/sw.js runs under node (sw_install_harness.mjs) with an in-memory Cache
Storage and a fake network: no browser is started. The template's placeholders are filled as build.py
fills them (a build id, the precache map of url -> sha256 and the sizes of url -> bytes).
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
HARNESS = Path(__file__).with_name("sw_install_harness.mjs")


def install(scenario: str) -> dict:
    node = shutil.which("node")
    assert node, "node is needed (build.py uses it too)"
    run = subprocess.run(
        [node, str(HARNESS), str(ROOT / "webshell" / "sw.js"), scenario],
        capture_output=True,
        text=True,
        timeout=60,
        check=True,
    )
    return json.loads(run.stdout.strip().splitlines()[-1])


def test_a_file_that_never_matches_its_hash_is_refused_and_nothing_is_kept():
    result = install("always-wrong")
    assert result["outcome"] == "refused", result
    assert "is not the file of build" in result["message"]
    assert result["cacheKept"] is False  # nothing half-stored: the previous version keeps running
    # the file fetched once revalidated, then once more past every cache before refusing (the sizes for
    # the progress count are in sw.js: nothing else is fetched)
    assert result["fetches"] == [
        ["./core.whl", "no-cache"],
        ["./core.whl", "reload"],
    ]


@pytest.mark.parametrize("scenario", ["stale-then-right"])
def test_a_stale_copy_is_fetched_again_past_every_cache(scenario):
    result = install(scenario)
    assert result["outcome"] == "installed", result
    assert result["body"] == "the build's bytes" and result["cacheKept"] is True
    assert result["fetches"][-1] == ["./core.whl", "reload"]
    # the page was told how far it got, in the build's bytes: none of 17 stored, then all 17
    size = len("the build's bytes")
    assert result["messages"] == [f"tidewell:stored:0:{size}", f"tidewell:stored:{size}:{size}"]
