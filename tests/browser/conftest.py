"""Fixtures for the browser tests (marked ``browser``).

- ``dist``: the site, built once per session into a temporary directory (or ``$TIDEWELL_DIST`` as is);
- ``make_server`` / ``server``: build.py's server on 127.0.0.1 with a free port, stopped by pid;
- ``make_browser`` / ``browser``: headless Chromium with a fresh profile, always quit; any SEVERE
  console entry the test did not expect fails the test.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))

from harness import ROOT, Browser, Server, build

sys.path.insert(0, str(ROOT / "core"))


def pytest_collection_modifyitems(items):
    here = Path(__file__).resolve().parent
    for item in items:
        if here in Path(str(item.fspath)).resolve().parents:
            item.add_marker(pytest.mark.browser)


@pytest.fixture(scope="session")
def dist(tmp_path_factory) -> Path:
    given = os.environ.get("TIDEWELL_DIST")
    if given:
        path = Path(given).resolve()
        assert (path / "build-manifest.json").exists(), f"TIDEWELL_DIST={given} is not a build"
        return path
    out = tmp_path_factory.mktemp("dist") / "site"
    build(out)
    return out


@pytest.fixture
def make_server():
    started: list[Server] = []

    def make(root: Path, **kwargs) -> Server:
        server = Server(root, **kwargs)
        started.append(server)
        return server.start()

    yield make
    for server in started:
        server.stop()


@pytest.fixture
def server(make_server, dist) -> Server:
    return make_server(dist)


@pytest.hookimpl(hookwrapper=True, tryfirst=True)
def pytest_runtest_makereport(item, call):
    outcome = yield
    report = outcome.get_result()
    if report.when == "call":
        item.call_passed = report.passed


@pytest.fixture
def make_browser(request):
    opened: list[Browser] = []

    def make(**kwargs) -> Browser:
        browser = Browser(**kwargs)
        opened.append(browser)
        return browser

    yield make
    problems = []
    for browser in opened:
        problems += browser.severe()
        if os.environ.get("TIDEWELL_SHOW_CONSOLE"):
            for entry in browser.console:
                print(f"[console {entry.get('level')}] {entry.get('message')}")
        browser.quit()
    if problems and getattr(request.node, "call_passed", False):
        pytest.fail("SEVERE console entries:\n" + "\n".join(problems), pytrace=False)


@pytest.fixture
def browser(make_browser) -> Browser:
    return make_browser()
