"""Servers and browsers for the browser tests and the start-up benchmark.

Everything started here is stopped here, by process id: a leftover server or browser holds pipes open
and wedges CI.

``Server``   ``python3 build.py serve --no-build`` on 127.0.0.1 in a subprocess; ``stop()`` and
             ``start()`` again keep the port (the offline and update tests need that);
             ``requests()`` lists what it answered.
``Browser``  headless Chromium through an explicit chromedriver (never Selenium Manager), a fresh
             temporary profile, the console captured; ``quit()`` also kills leftovers by pid.
"""

from __future__ import annotations

import json
import os
import re
import selectors
import shutil
import signal
import socket
import subprocess
import sys
import tempfile
import time
from pathlib import Path

os.environ["SE_AVOID_STATS"] = "true"  # before selenium is imported: no usage statistics

from selenium import webdriver
from selenium.webdriver.chrome.service import Service

ROOT = Path(__file__).resolve().parents[2]
BUILD_PY = ROOT / "build.py"
CHROMIUM = os.environ.get("TIDEWELL_CHROMIUM", "/usr/bin/chromium")
CHROMEDRIVER = os.environ.get("TIDEWELL_CHROMEDRIVER", "/usr/bin/chromedriver")
CHROME_ARGS = (
    "--headless=new",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-dev-shm-usage",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-default-apps",
    "--disable-extensions",
    "--no-first-run",
    "--no-default-browser-check",
    "--disable-quic",
    # a name that is not 127.0.0.1 cannot be resolved: a stray request fails loudly instead of leaving
    "--host-resolver-rules=MAP * ~NOTFOUND , EXCLUDE 127.0.0.1",
    "--window-size=420,900",
)


def build(out: Path, *args: str) -> None:
    """Run build.py into ``out`` (fails the caller with build.py's own output)."""
    proc = subprocess.run(
        [sys.executable, str(BUILD_PY), "--out", str(out), *args],
        capture_output=True,
        text=True,
        timeout=600,
    )
    if proc.returncode != 0:
        raise RuntimeError(f"build.py failed:\n{proc.stdout}\n{proc.stderr}")


class Server:
    """build.py's static server in a subprocess."""

    def __init__(
        self, root: Path, *, port: int = 0, prefix: str = "/", csp: str | None = None, stall: str = ""
    ):
        self.root, self.port, self.prefix, self.csp, self.stall = Path(root), port, prefix, csp, stall
        self.proc: subprocess.Popen | None = None
        self.url = ""
        self.log = tempfile.TemporaryFile()

    def start(self, **changes) -> Server:
        """Start (again); ``changes`` replace root/prefix/csp/stall. The port stays once chosen."""
        if self.proc is not None:
            raise RuntimeError("server already running")
        for key, value in changes.items():
            setattr(self, key, value)
        cmd = [sys.executable, str(BUILD_PY), "serve", "--no-build", "--out", str(self.root)]
        cmd += ["--port", str(self.port), "--prefix", self.prefix, "--log"]
        if self.csp is not None:
            cmd += ["--csp", self.csp]
        if self.stall:
            cmd += ["--stall", self.stall]
        self.proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=self.log, text=True)
        line = self._first_line(timeout=20)
        match = re.search(r"at (http://127\.0\.0\.1:(\d+)\S*)", line)
        if not match:
            self.stop()
            raise RuntimeError(f"server did not start: {line!r}")
        self.url, self.port = match.group(1), int(match.group(2))
        return self

    def _first_line(self, timeout: float) -> str:
        assert self.proc is not None and self.proc.stdout is not None
        with selectors.DefaultSelector() as sel:
            sel.register(self.proc.stdout, selectors.EVENT_READ)
            if not sel.select(timeout):
                return ""
        return self.proc.stdout.readline()

    @property
    def origin(self) -> str:
        return f"http://127.0.0.1:{self.port}"

    def stop(self) -> None:
        """Stop the server process by its pid and wait until the port refuses connections."""
        proc, self.proc = self.proc, None
        if proc is None:
            return
        if proc.poll() is None:
            os.kill(proc.pid, signal.SIGTERM)
            try:
                proc.wait(timeout=10)
            except subprocess.TimeoutExpired:
                os.kill(proc.pid, signal.SIGKILL)
                proc.wait(timeout=10)
        if proc.stdout:
            proc.stdout.close()
        deadline = time.monotonic() + 5
        while time.monotonic() < deadline and self.accepting():
            time.sleep(0.05)

    def accepting(self) -> bool:
        try:
            with socket.create_connection(("127.0.0.1", self.port), timeout=0.5):
                return True
        except OSError:
            return False

    def requests(self) -> list[tuple[str, str, int]]:
        """(method, path, status) of every request answered so far, across restarts, in order."""
        self.log.flush()
        self.log.seek(0)
        text = self.log.read().decode(errors="replace")
        self.log.seek(0, os.SEEK_END)
        return [
            (m.group(1), m.group(2), int(m.group(3)))
            for m in re.finditer(r'"(\w+) (\S+) HTTP/[\d.]+" (\d{3})', text)
        ]

    def restart(self, **changes) -> Server:
        self.stop()
        return self.start(**changes)


class Browser:
    """Headless Chromium with a fresh profile; console entries are collected for the SEVERE check."""

    def __init__(self, *, perf_log: bool = False):
        self.profile = tempfile.mkdtemp(prefix="tidewell-chrome-")
        options = webdriver.ChromeOptions()
        options.binary_location = CHROMIUM
        for arg in CHROME_ARGS:
            options.add_argument(arg)
        options.add_argument(f"--user-data-dir={self.profile}")
        logging_prefs = {"browser": "ALL"}
        if perf_log:
            logging_prefs["performance"] = "ALL"
            options.add_experimental_option("perfLoggingPrefs", {"enableNetwork": True, "enablePage": False})
        options.set_capability("goog:loggingPrefs", logging_prefs)
        self.service = Service(executable_path=CHROMEDRIVER)
        self.console: list[dict] = []
        self.allowed: list[re.Pattern] = []
        try:
            self.driver = webdriver.Chrome(service=self.service, options=options)
        except Exception:
            self._kill_leftovers()
            shutil.rmtree(self.profile, ignore_errors=True)
            raise
        self.driver.set_script_timeout(120)

    # -- console --
    def drain_console(self) -> list[dict]:
        try:
            entries = self.driver.get_log("browser")
        except Exception:
            entries = []
        self.console.extend(entries)
        return entries

    def allow_console(self, pattern: str) -> None:
        """Expect SEVERE entries matching ``pattern`` (a test that provokes a failure on purpose)."""
        self.allowed.append(re.compile(pattern))

    def severe(self) -> list[str]:
        self.drain_console()
        return [
            e["message"]
            for e in self.console
            if e.get("level") == "SEVERE" and not any(p.search(e["message"]) for p in self.allowed)
        ]

    # -- page helpers --
    def get(self, url: str) -> None:
        self.driver.get(url)

    def js(self, script: str, *args):
        return self.driver.execute_script(script, *args)

    def wait_js(self, body: str, *args, timeout: float = 60):
        """Run ``body`` as an async function body (``await`` allowed); its return value, or a timeout error.

        Waits on the page's own promises and events, never on a fixed sleep.
        """
        script = (
            "const done = arguments[arguments.length - 1];"
            f"const timer = setTimeout(() => done({{timeout: true}}), {int(timeout * 1000)});"
            f"(async (...args) => {{ {body} }})(...Array.from(arguments).slice(0, -1))"
            ".then((v) => { clearTimeout(timer); done({value: v === undefined ? null : v}); },"
            "      (e) => { clearTimeout(timer); done({error: String(e && e.stack || e)}); });"
        )
        self.driver.set_script_timeout(timeout + 10)
        out = self.driver.execute_async_script(script, *args)
        if out.get("timeout"):
            raise TimeoutError(f"page did not finish within {timeout} s: {body[:120]}; {self.state()}")
        if "error" in out:
            raise RuntimeError(f"page script failed: {out['error']}")
        return out["value"]

    def state(self) -> str:
        try:
            return str(
                self.js(
                    "return [document.documentElement.dataset.engine,"
                    " (document.querySelector('#engine-text') || {}).textContent]"
                )
            )
        except Exception as exc:  # the page may be gone
            return f"(no page state: {exc.__class__.__name__})"

    def wait_engine(self, timeout: float = 90) -> dict:
        """Wait on window.tidewell.ready; the engine's start-up info."""
        return self.wait_js(
            "while (!window.tidewell) await new Promise((r) => setTimeout(r, 20));"
            "await window.tidewell.ready; return window.tidewell.engine.info;",
            timeout=timeout,
        )

    def wait_engine_state(self, state: str, timeout: float = 60) -> str:
        """Wait until the engine's state is ``state``; its status text."""
        return self.wait_js(
            "const want = arguments[0];"
            "while (!window.tidewell) await new Promise((r) => setTimeout(r, 20));"
            "const e = window.tidewell.engine;"
            "if (e.state !== want) await new Promise((r) => e.addEventListener('state',"
            "  (ev) => { if (ev.detail.state === want) r(); }));"
            "return document.querySelector('#engine-text').textContent;",
            state,
            timeout=timeout,
        )

    def wait_controlled(self, timeout: float = 90) -> str:
        """Wait until a service worker controls the page (so the whole build is precached)."""
        return self.wait_js(
            "if (!navigator.serviceWorker.controller) await new Promise((r) =>"
            "  navigator.serviceWorker.addEventListener('controllerchange', r, {once: true}));"
            "return navigator.serviceWorker.controller.scriptURL;",
            timeout=timeout,
        )

    def compute(self, request: dict, timeout: float = 60) -> dict:
        return self.wait_js("return await window.tidewell.compute(arguments[0]);", request, timeout=timeout)

    def performance_log(self) -> list[dict]:
        return [json.loads(e["message"])["message"] for e in self.driver.get_log("performance")]

    # -- teardown --
    def quit(self) -> None:
        self.drain_console()
        try:
            self.driver.quit()
        except Exception:
            pass
        self._kill_leftovers()
        shutil.rmtree(self.profile, ignore_errors=True)

    def _kill_leftovers(self) -> None:
        """Kill, by pid, chromedriver and any browser process still using this profile."""
        pids = []
        proc = getattr(self.service, "process", None)
        if proc is not None and proc.poll() is None:
            pids.append(proc.pid)
        for entry in Path("/proc").iterdir():
            if not entry.name.isdigit():
                continue
            try:
                cmdline = (entry / "cmdline").read_bytes()
            except OSError:
                continue
            if self.profile.encode() in cmdline:
                pids.append(int(entry.name))
        for pid in pids:
            try:
                os.kill(pid, signal.SIGKILL)
            except OSError:
                pass
