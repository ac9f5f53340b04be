"""Fault injection for the browser tests: reach into the engine's worker through the DevTools protocol.

chromedriver sends CDP commands to the page's own session only (``execute_cdp_cmd``). A dedicated
worker is a target of its own: ``Target.attachToTarget`` (not flattened) gives a session id, and
``Target.sendMessageToTarget`` delivers a command to the worker's thread. The answer would come back
as an event that chromedriver does not pass on, so only commands whose answer is not needed are sent:
``Runtime.evaluate`` of a busy loop (the thread never returns), ``Debugger.pause`` (the thread stops at
the next statement it runs), or of a ``throw`` on a timer (an uncaught error: the worker's "error" event).
"""

from __future__ import annotations

import json
import time

from screens_support import tap
from selenium.webdriver.common.by import By

# a request every test can send; the expected answer is always the CPython core's own
CONVERT = {"calc": "convert", "inputs": {"quantity": {"value": 7.9, "unit": "kPa"}, "to": "mmHg"}}
BLOOD_GAS_FIELDS = {"ph": "7.21", "pco2": ("8.6", "kPa"), "po2": ("8.4", "kPa")}


def engine_url(base: str, screen: str = "convert", **params) -> str:
    """The page with shortened deadlines; the start-up watchdog is long (CI machines are shared)."""
    params = {"engine_timeout": 120_000, **params}
    query = "&".join(f"{k.replace('_', '-')}={v}" for k, v in params.items())
    return f"{base}{'?' + query if query else ''}#{screen}"


class WorkerControl:
    """The engine's current worker, seen from the DevTools protocol."""

    def __init__(self, browser):
        self.browser = browser
        self.used: set[str] = set()
        self.sessions: dict[str, str] = {}
        self.next_id = 1

    def workers(self) -> list[str]:
        infos = self.browser.driver.execute_cdp_cmd("Target.getTargets", {})["targetInfos"]
        return [
            t["targetId"] for t in infos if t["type"] == "worker" and t["url"].endswith("/core-worker.js")
        ]

    def current(self, timeout: float = 10) -> str:
        """The engine worker not yet used by a previous injection (a new worker after each restart)."""
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            fresh = [t for t in self.workers() if t not in self.used]
            if len(fresh) == 1:
                return fresh[0]
            time.sleep(0.05)
        raise AssertionError(f"no single new engine worker target: {self.workers()}, used {self.used}")

    def send(self, method: str, params: dict | None = None) -> str:
        target = self.current()
        session = self.sessions.get(target)
        if session is None:
            attached = self.browser.driver.execute_cdp_cmd(
                "Target.attachToTarget", {"targetId": target, "flatten": False}
            )
            session = self.sessions[target] = attached["sessionId"]
        message = {"id": self.next_id, "method": method, "params": params or {}}
        self.next_id += 1
        self.browser.driver.execute_cdp_cmd(
            "Target.sendMessageToTarget", {"sessionId": session, "message": json.dumps(message)}
        )
        return target

    def done_with(self, target: str) -> None:
        self.used.add(target)

    # -- the faults --
    def hang(self) -> str:
        """Busy-loop the worker's thread for ever (until the page terminates the worker)."""
        target = self.send("Runtime.evaluate", {"expression": "for (;;) {}"})
        self.done_with(target)
        return target

    def pause(self) -> str:
        """Stop the worker's thread at the next statement it runs (the next message it receives)."""
        self.send("Debugger.enable")
        target = self.send("Debugger.pause")
        self.done_with(target)
        return target

    def crash(self, message: str) -> str:
        """An uncaught error in the worker: the page's Worker object gets an "error" event."""
        target = self.send(
            "Runtime.evaluate",
            {"expression": f"setTimeout(() => {{ throw new Error({json.dumps(message)}); }}, 0); 1"},
        )
        self.done_with(target)
        return target

    def log(self, text: str) -> None:
        """console.log in the worker (to check that the console capture sees the worker too)."""
        self.send("Runtime.evaluate", {"expression": f"console.log({json.dumps(text)})"})


def wait_restarted(browser, count: int, timeout: float = 90) -> str:
    """Wait until the engine has restarted ``count`` times and is ready again; the status text."""
    return browser.wait_js(
        "const want = arguments[0]; const e = window.tidewell.engine;"
        "while (!(e.restarts >= want && e.state === 'ready'))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return document.querySelector('#engine-text').textContent;",
        count,
        timeout=timeout,
    )


# Start a request and remember when and how it settles (ms after it was sent), in the page.
TRACK = (
    "const t0 = performance.now();"
    "window.__tracked = window.tidewell.compute(arguments[0]).then("
    "  (r) => ({how: 'resolved', ms: performance.now() - t0, value: r}),"
    "  (e) => ({how: 'rejected', ms: performance.now() - t0, name: e.name, message: e.message}));"
)
SETTLED = "return await window.__tracked;"


def report_figures(request, line: str) -> None:
    """Write a line of figures to the terminal even when pytest captures the output."""
    capture = request.config.pluginmanager.get_plugin("capturemanager")
    reporter = request.config.pluginmanager.get_plugin("terminalreporter")
    print(line)
    if capture is None or reporter is None:
        return
    with capture.global_and_fixture_disabled():
        reporter.write_line("")
        reporter.write_line(line)


# -- the case log --

FROZEN = "2026-01-02T03:04:05.000Z"
# the export time is frozen (caselog.clock), and every file offered for download is kept (its Blob)
HOOK_EXPORTS = (
    "const m = await import(new URL('js/caselog.js', document.baseURI).href);"
    "m.clock.now = () => new Date(arguments[0]);"
    "if (!window.__blobs) { window.__blobs = []; const make = URL.createObjectURL.bind(URL);"
    "  URL.createObjectURL = (blob) => { window.__blobs.push(blob); return make(blob); }; }"
)


def save_case(browser, calc: str, label: str) -> str:
    """Type a label under panel ``calc``'s reading and press Save; the status text."""
    field = browser.driver.find_element(By.ID, f"p-{calc}-label")
    browser.js("arguments[0].scrollIntoView({block: 'center'})", field)
    field.clear()
    field.send_keys(label)
    browser.js(f"document.querySelector('#p-{calc} [role=status]').textContent = ''")
    tap(browser, By.CSS_SELECTOR, f"#p-{calc}-save")
    return browser.wait_js(
        "const s = document.querySelector('#p-' + arguments[0] + ' [role=status]');"
        "while (!s.textContent.startsWith('Saved') && !s.textContent.startsWith('Not'))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return s.textContent;",
        calc,
        timeout=20,
    )


def show_log(browser) -> None:
    """Go to the case log screen (where its buttons are)."""
    browser.wait_js(
        "if (location.hash !== '#log') location.hash = 'log';"
        "while (document.documentElement.dataset.screen !== 'log')"
        "  await new Promise((r) => setTimeout(r, 20));"
    )


def export_text(browser) -> str:
    """Press Export JSON; the exact text of the file offered for download."""
    show_log(browser)
    browser.wait_js(HOOK_EXPORTS, FROZEN)
    before = browser.js("return window.__blobs.length")
    tap(browser, By.ID, "log-export-json")
    return browser.wait_js(
        "while (window.__blobs.length === arguments[0]) await new Promise((r) => setTimeout(r, 20));"
        "return await window.__blobs[window.__blobs.length - 1].text();",
        before,
    )


def import_path(browser, path) -> list[str]:
    """Import the file at ``path`` through the page's file input; [state, message]."""
    show_log(browser)
    browser.js("delete document.documentElement.dataset.importState")
    browser.driver.find_element(By.ID, "log-import").send_keys(str(path))
    return browser.wait_js(
        "while (!document.documentElement.dataset.importState) await new Promise((r) => setTimeout(r, 20));"
        "return [document.documentElement.dataset.importState,"
        " document.querySelector('#log-message').textContent];",
        timeout=60,
    )


def stored(browser) -> list[dict]:
    """Every record in the IndexedDB store, read directly (not through the page's code)."""
    return browser.wait_js(
        "const db = await new Promise((ok, no) => { const r = indexedDB.open('tidewell');"
        "  r.onupgradeneeded = () => r.result.createObjectStore('cases', {keyPath: 'id'});"
        "  r.onsuccess = () => ok(r.result); r.onerror = () => no(r.error); });"
        "try { return await new Promise((ok, no) => {"
        "  const q = db.transaction('cases').objectStore('cases').getAll();"
        "  q.onsuccess = () => ok(q.result); q.onerror = () => no(q.error); }); } finally { db.close(); }"
    )
