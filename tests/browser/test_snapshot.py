"""The engine's memory snapshot: a start from it answers exactly like a normal start, a bad one is never
used, and an update replaces it.

The build makes the snapshot (build.py make_snapshot); the service worker stores it after the first
start; the worker starts from it when its sha256 is the build's, and otherwise, or when the start from it
fails or stalls, starts the normal way and says why (core-worker.js). Expected answers come from the
normal start in the same browser and from CPython's bridge (the published checks of every worked case
are in test_worked_cases.py).
"""

from __future__ import annotations

import hashlib
import re
import shutil
from pathlib import Path

import pytest
from harness import build
from offline_support import manifest, precache_list
from selenium.common.exceptions import WebDriverException
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import WebDriverWait

import compare
from casebook import worked_requests
from tidewell import bridge


def _close(a, b, path="response", rel_tol=compare.REL_WEBASSEMBLY):
    """Two answers agree (tests/compare.py): numbers to ``rel_tol``, everything else exactly."""
    diffs = compare.differences(a, b, rel_tol)
    assert not diffs, f"{path}: {diffs[:5]}"


SNAPSHOT = "pyodide/engine.snapshot"
CURVE = {"calc": "oxygen_dissociation_curve", "inputs": {}}  # needs numpy: loaded on first use
# a zone far from the build machine's (the snapshot is made in UTC), with summer time in January
ZONE = "Pacific/Auckland"


def same(a, b, case: str) -> None:
    """Two engines on the same WebAssembly: categories, texts and structure exactly; floats to 1e-12
    relative (the same binary should give the same bits; the tolerance only keeps the message readable)."""
    _close(a, b, case, rel_tol=1e-12)


def visit(browser, url: str) -> None:
    """A new page load (get() of the address the tab shows, fragment and all, would not reload)."""
    browser.get("about:blank")
    browser.get(url)


def start_of(browser) -> dict:
    info = browser.wait_engine(timeout=120)
    return {"start": info["start"], "note": info["start_note"], "label": info["label"]}


def environment(browser) -> dict:
    return browser.wait_js("return await window.tidewell.engine.environment();")


def wait_stored(browser, site: Path) -> None:
    """Until the service worker holds this build's snapshot, with the bytes its sw.js names."""
    build_id = manifest(site)["build_id"]
    sha = precache_list(site, "DEFERRED")[f"./{SNAPSHOT}"]
    got = browser.wait_js(
        "const [name, sha] = arguments;"
        "const hex = (b) => Array.from(new Uint8Array(b), (x) => x.toString(16).padStart(2, '0')).join('');"
        "for (;;) {"
        "  const cache = await caches.open(name);"
        "  const hit = await cache.match('./pyodide/engine.snapshot');"
        "  const got = hit && hex(await crypto.subtle.digest('SHA-256', await hit.arrayBuffer()));"
        "  if (got === sha) return sha;"
        "  await new Promise((r) => setTimeout(r, 200)); }",
        f"tidewell-{build_id}",
        sha,
        timeout=120,
    )
    assert got == sha


def first_visit(browser, server, site: Path, query: str = "") -> None:
    """A first visit: a normal start; the snapshot is stored afterwards, for the next start."""
    visit(browser, server.url + query + "#convert")
    info = start_of(browser)
    assert info["start"] == "normal" and "not in the offline copy yet" in info["note"], info
    browser.wait_controlled()
    wait_stored(browser, site)


def answers(browser) -> list[tuple[str, dict]]:
    return [(case_id, browser.compute(request)) for case_id, request, _ in worked_requests()]


def test_a_start_from_the_snapshot_answers_every_worked_case_as_a_normal_start(
    make_browser, make_server, dist
):
    server = make_server(dist)
    browser = make_browser()
    browser.driver.execute_cdp_cmd("Emulation.setTimezoneOverride", {"timezoneId": ZONE})
    first_visit(browser, server, dist)
    normal = answers(browser)
    normal_curve = browser.compute(CURVE)
    normal_env = environment(browser)
    assert normal_env["start"]["start"] == "normal"

    visit(browser, server.url + "#convert")
    assert start_of(browser) == {"start": "snapshot", "note": "", "label": ""}
    snap_env = environment(browser)  # before any calculation: what the start itself left
    restored = answers(browser)
    assert len(restored) == len(normal) >= 20
    for (case_id, a), (_, b) in zip(normal, restored, strict=True):
        assert b["ok"], (case_id, b.get("errors"))
        same(a, b, case_id)
    for (case_id, request, _), (_, page) in zip(worked_requests(), restored, strict=True):
        _close(page, bridge.handle_obj(request), case_id)  # and CPython's answer, to 1e-9
    # numpy is not in the snapshot: it loads on first use, as in a normal start
    assert "numpy" not in browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
    same(normal_curve, browser.compute(CURVE), "curve")
    assert "numpy" in browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")

    # the device's language and time zone, not the build machine's; the same environment and path
    assert snap_env["start"] == {"start": "snapshot", "note": ""}
    python_normal, python_snap = normal_env["python"], snap_env["python"]
    # the zone override reaches the engine: Auckland is UTC+12 (+13 in summer), never the build's UTC
    assert python_normal["timezone"] == -12 * 3600 and python_normal["altzone"] == -13 * 3600
    for key in ("environ", "tzname", "timezone", "altzone", "daylight", "path"):
        assert python_snap[key] == python_normal[key], key
    assert (
        python_snap["environ"]["LANG"].endswith(".UTF-8") and "PYTHONHASHSEED" not in python_snap["environ"]
    )

    # the random state is reseeded at each start from the snapshot, not the one frozen in it
    visit(browser, server.url + "#convert")
    assert start_of(browser)["start"] == "snapshot"
    assert environment(browser)["python"]["random"] != python_snap["random"]


def patched_site(dist: Path, out: Path, snapshot: bytes) -> Path:
    """A copy of the build whose snapshot is ``snapshot``, with the build's records of it (build-info.js,
    the service worker's lists) rewritten to its sha256: only loading it can tell it is wrong."""
    shutil.copytree(dist, out)
    old = manifest(dist)["snapshot"]["sha256"]
    new = hashlib.sha256(snapshot).hexdigest()
    (out / SNAPSHOT).write_bytes(snapshot)
    info = out / "js" / "build-info.js"
    old_info = hashlib.sha256(info.read_bytes()).hexdigest()
    info.write_text(info.read_text().replace(old, new))
    sw = out / "sw.js"
    text = sw.read_text().replace(old, new).replace(old_info, hashlib.sha256(info.read_bytes()).hexdigest())
    sw.write_text(text)
    assert precache_list(out, "DEFERRED")[f"./{SNAPSHOT}"] == new
    return out


@pytest.fixture(scope="module")
def other_label(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("dist-snapshot-label") / "site"
    build(out, "--build-label", "snapshot-other")
    return out


def check_falls_back(browser, server, site: Path, query: str, reason: str) -> None:
    first_visit(browser, server, site, query)
    visit(browser, server.url + query + "#convert")
    info = start_of(browser)
    assert info["start"] == "normal" and re.search(reason, info["note"]), info
    for case_id, request, _ in (worked_requests()[0], worked_requests()[-1]):
        _close(browser.compute(request), bridge.handle_obj(request), case_id)


def test_a_damaged_stored_snapshot_is_not_used_and_is_replaced(make_browser, make_server, dist):
    server = make_server(dist)
    browser = make_browser()
    first_visit(browser, server, dist)
    # one byte flipped in the stored copy (storage damaged on the device)
    browser.wait_js(
        "const cache = await caches.open(arguments[0]);"
        "const url = './pyodide/engine.snapshot';"
        "const data = new Uint8Array(await (await cache.match(url)).arrayBuffer());"
        "data[data.length >> 1] ^= 0xff;"
        "await cache.put(url, new Response(data));",
        f"tidewell-{manifest(dist)['build_id']}",
    )
    visit(browser, server.url + "#convert")
    info = start_of(browser)
    assert info["start"] == "normal" and "not this build's" in info["note"], info
    request = worked_requests()[0][1]
    _close(browser.compute(request), bridge.handle_obj(request))
    # the normal start asked the service worker again: it found the copy wrong and stored the build's
    wait_stored(browser, dist)
    visit(browser, server.url + "#convert")
    assert start_of(browser)["start"] == "snapshot"
    _close(browser.compute(request), bridge.handle_obj(request))


def test_a_stalled_start_from_the_snapshot_falls_back(make_browser, make_server, dist):
    server = make_server(dist)
    browser = make_browser()
    # the worker's watchdog at 1 ms: the start from the snapshot counts as stalled
    check_falls_back(browser, server, dist, "?snapshot-timeout=1", r"did not finish within 1 ms")


def test_a_snapshot_that_passes_the_hash_check_but_fails_to_load_falls_back(
    make_browser, make_server, dist, tmp_path
):
    data = bytearray((dist / SNAPSHOT).read_bytes())
    data[0] ^= 0xFF  # the header's magic number
    site = patched_site(dist, tmp_path / "bad-magic", bytes(data))
    server = make_server(site)
    browser = make_browser()
    check_falls_back(browser, server, site, "", r"invalid magic number")


def test_another_builds_snapshot_is_not_used(make_browser, make_server, dist, other_label, tmp_path):
    # a real snapshot, of a build with another label, named as this build's: the label inside tells
    site = patched_site(dist, tmp_path / "foreign", (other_label / SNAPSHOT).read_bytes())
    server = make_server(site)
    browser = make_browser()
    check_falls_back(browser, server, site, "", r"made for another build")


def test_an_update_replaces_the_snapshot(make_browser, make_server, dist, other_label):
    old_id, new_id = manifest(dist)["build_id"], manifest(other_label)["build_id"]
    assert manifest(dist)["snapshot"]["sha256"] != manifest(other_label)["snapshot"]["sha256"]
    server = make_server(dist)
    browser = make_browser()
    first_visit(browser, server, dist, "?engine-timeout=120000")
    visit(browser, server.url + "?engine-timeout=120000#convert")
    assert start_of(browser) == {"start": "snapshot", "note": "", "label": ""}

    server.restart(root=other_label)
    browser.driver.refresh()
    browser.wait_js(
        "const banner = document.querySelector('#update');"
        "while (banner.hidden) await new Promise((r) => setTimeout(r, 50));",
        timeout=120,
    )
    browser.driver.find_element(By.ID, "update-reload").click()
    WebDriverWait(browser.driver, 90, poll_frequency=0.1, ignored_exceptions=(WebDriverException,)).until(
        lambda d: d.execute_script("return document.documentElement.dataset.buildId") == new_id
    )
    # the old snapshot went with the old build's cache: the first start of the new build is normal
    info = start_of(browser)
    assert info["start"] == "normal" and info["label"] == "snapshot-other", info
    wait_stored(browser, other_label)
    held = browser.wait_js("return await caches.keys();")
    assert held == [f"tidewell-{new_id}"] and old_id != new_id
    visit(browser, server.url + "?engine-timeout=120000#convert")
    assert start_of(browser) == {"start": "snapshot", "note": "", "label": "snapshot-other"}
    request = worked_requests()[0][1]
    _close(browser.compute(request), bridge.handle_obj(request))
