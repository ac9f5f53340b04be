"""The service worker: really offline (the server process is stopped), sub-paths, and updates.

CDP network emulation does not cover service-worker fetches, so "offline" here means the server is
gone: nothing answers on the port any more.
"""

from __future__ import annotations

import json
from collections import Counter
from pathlib import Path

import pytest
from harness import build
from selenium.common.exceptions import WebDriverException
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import Select, WebDriverWait

from tidewell import bridge

REQUEST = {"calc": "convert", "inputs": {"quantity": {"value": 12.1, "unit": "kPa"}, "to": "mmHg"}}
SUB_PATH = "/wards/night-shift/tidewell/"


def expected(request: dict) -> dict:
    return json.loads(bridge.handle(json.dumps(request)))


def form_convert(browser, value: str, source: str, target: str) -> list:
    field = browser.driver.find_element(By.ID, "convert-value")
    field.clear()
    field.send_keys(value)
    Select(browser.driver.find_element(By.ID, "convert-from")).select_by_value(source)
    Select(browser.driver.find_element(By.ID, "convert-to")).select_by_value(target)
    browser.driver.find_element(By.ID, "convert-go").click()
    return browser.wait_js(
        "const box = document.querySelector('#convert-answer');"
        "const out = document.querySelector('#convert-result');"
        "while (box.dataset.state !== 'done' || out.dataset.unit !== arguments[0])"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return [Number(out.dataset.value), out.dataset.unit];",
        target,
    )


def test_offline_after_the_server_is_stopped(make_browser, make_server, dist):
    server = make_server(dist, prefix=SUB_PATH)
    browser = make_browser()
    browser.get(server.url + "#convert")
    browser.wait_engine()
    scope_script = browser.wait_controlled()
    assert scope_script == server.url + "sw.js"  # registered under the sub-path, relative URLs only
    assert browser.js("return document.querySelector('#offline-status').dataset.offline") == "ready"
    # the offline copy did not download the site a second time: the service worker's requests were
    # revalidations of what the page had just fetched (304), so no file came in full twice
    full = Counter(path for method, path, status in server.requests() if method == "GET" and status == 200)
    assert full[SUB_PATH + "pyodide/pyodide.asm.wasm"] == 1
    assert [path for path, n in full.items() if n > 1] == []
    precached = json.loads((dist / "build-manifest.json").read_text())["files"]
    assert {SUB_PATH + f["path"] for f in precached} <= {p for _, p, _ in server.requests()}

    server.stop()
    assert not server.accepting()
    browser.driver.refresh()
    info = browser.wait_engine()
    assert info["engine"] == expected(REQUEST)["engine"]
    assert browser.compute(REQUEST) == expected(REQUEST)
    want = expected(REQUEST)["outputs"]["result"]
    assert form_convert(browser, "12.1", "kPa", "mmHg") == [want["value"], want["unit"]]
    # the About line still knows the build it runs
    build_id = json.loads((dist / "build-manifest.json").read_text())["build_id"]
    assert browser.js("return document.querySelector('#about-build').textContent") == build_id

    # a page of the app never visited before is still served (navigations get ./index.html)
    browser.get(server.url + "?screen=later#convert")
    browser.wait_engine()
    assert browser.compute(REQUEST)["ok"] is True


@pytest.fixture(scope="session")
def dist_next(tmp_path_factory, dist) -> Path:
    """A second build of the same tree with a label: same code, new build id (an update)."""
    out = tmp_path_factory.mktemp("dist-next") / "site"
    build(out, "--build-label", "next")
    return out


def test_update_waits_for_consent(make_browser, make_server, dist, dist_next):
    old_id = json.loads((dist / "build-manifest.json").read_text())["build_id"]
    new_id = json.loads((dist_next / "build-manifest.json").read_text())["build_id"]
    assert old_id != new_id

    server = make_server(dist)
    browser = make_browser()
    browser.get(server.url + "#convert")
    browser.wait_engine()
    browser.wait_controlled()
    assert browser.js("return document.documentElement.dataset.buildId") == old_id

    # the site is updated in place: same port, new files
    before = len(server.requests())
    server.restart(root=dist_next)
    browser.driver.refresh()
    browser.wait_engine()
    browser.wait_js(
        "const banner = document.querySelector('#update');"
        "while (banner.hidden) await new Promise((r) => setTimeout(r, 50));",
        timeout=90,
    )
    # nothing switched without consent: the page and its service worker are still the old build
    assert browser.js("return document.documentElement.dataset.buildId") == old_id
    running = browser.wait_js(
        "const sw = navigator.serviceWorker;"
        "const answer = new Promise((r) => sw.addEventListener('message', (e) => r(e.data), {once: true}));"
        "sw.controller.postMessage('tidewell:build-id'); return await answer;"
    )
    assert running == f"tidewell:build-id:{old_id}"
    assert "Update ready" in browser.js("return document.querySelector('#update').textContent")

    browser.driver.find_element(By.ID, "update-reload").click()
    # the page reloads itself once the new worker has taken over: poll across the navigation
    WebDriverWait(browser.driver, 60, poll_frequency=0.1, ignored_exceptions=(WebDriverException,)).until(
        lambda d: d.execute_script("return document.documentElement.dataset.buildId") == new_id
    )
    browser.wait_engine()
    assert browser.js("return document.querySelector('#about-version').textContent").endswith("(next)")
    caches = browser.wait_js("return await caches.keys();")
    assert caches == [f"tidewell-{new_id}"]  # the old build's cache was deleted on activate
    # the update downloaded only files whose bytes changed; the rest came from the old build's cache
    old_files = {
        f["path"]: f["sha256"] for f in json.loads((dist / "build-manifest.json").read_text())["files"]
    }
    new_files = {
        f["path"]: f["sha256"] for f in json.loads((dist_next / "build-manifest.json").read_text())["files"]
    }
    changed = {"/" + p for p, sha in new_files.items() if old_files.get(p) != sha}
    assert "/js/build-info.js" in changed and "/pyodide/pyodide.asm.wasm" not in changed
    fetched = {p.split("?")[0] for m, p, status in server.requests()[before:] if m == "GET" and status == 200}
    assert fetched - {"/sw.js", "/build-manifest.json"} <= changed, fetched
    cached = browser.wait_js(
        "const c = await caches.open(arguments[0]);"
        "return (await c.keys()).map((r) => new URL(r.url).pathname);",
        f"tidewell-{new_id}",
    )
    assert sorted(cached) == sorted(["/" + p for p in new_files] + ["/build-manifest.json"])
    assert browser.compute(REQUEST) == expected(REQUEST)
