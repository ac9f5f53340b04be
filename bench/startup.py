#!/usr/bin/env python3
"""Start-up of Tidewell beside bare Pyodide: cold, warm, offline; with and without 4x CPU throttling.

    python3 bench/startup.py [--runs 5] [--rates 1,4] [--quick] [--warm-plus] [--routes]
                             [--arms bare,shipped,app,snapshot] [--dist DIR] [--json FILE]

Four pages ("arms") are served from one copy of the build:
  bare      bench/bare/ copied to <dist>/bare/: a module worker loads Pyodide as released (bare/pyodide/,
            from the pinned npm package, with the build's lock file) with the engine's options and runs
            ``1+1``; its page marks ``bare:engine-ready`` when the answer arrives. It has a service worker
            of the same shape as the app's (precache, cache first), holding only what it needs;
  shipped   the same bare page on the app's own runtime (<dist>/bare-shipped/: the build's
            python_stdlib.zip, start-up modules compiled): what Pyodide alone costs as Tidewell ships it;
  app       the app to ``tidewell:first-result`` (a ``blood_gas`` request sent at engine-ready), always
            started the normal way (``?snapshot=off``; nothing is stored for a snapshot start);
  snapshot  the app as a visitor gets it: after the first visit the benchmark waits until the service
            worker has stored the snapshot, so the warm and offline visits start from it (each visit's
            ``start`` is checked; a series where they did not is reported as a problem).
Each *series* is one fresh headless Chromium profile and one server, visiting one page in turn:
  cold     the first visit (nothing cached, no service worker; the snapshot arm starts normally too);
  warm     the 2nd visit, served by the service worker (the benchmark waits until it controls the page);
  warm+    (with --warm-plus) the 3rd visit. An earlier version of this text said V8 keeps its compiled
           code for pyodide.asm.wasm from the second sighting on, so this would be the steady state; in the
           runs measured for issue 18 Chromium kept no compiled WebAssembly code between visits (served by
           the service worker or by the HTTP cache): warm+ costs what warm costs (docs/performance.md);
  offline  the server process is stopped, then one more visit.
Runs rotate the order of the arms (bare, shipped, app, snapshot; then shipped, app, snapshot, bare; ...) so
drift in the machine's load hits all alike; ratios (snapshot / bare, snapshot / app, ...) are taken run
by run, then their median.

Throttling (``--rates``, 1 = none): CDP ``Emulation.setCPUThrottlingRate`` on the page target. Chromium
refuses that command on a worker target ("only supported for pages"), so the engine's dedicated worker
thread is slowed by the same method Chromium uses for the page (run a slice, hold it for rate - 1 slices):
the worker is caught paused at its start (Target.setAutoAttach with waitForDebuggerOnStart), its OS thread
is held and released with ptrace, and only then is it let run. Service-worker and V8's background compile
threads are not slowed (for any page). Each series ends with a CPU-bound loop timed in the page and in
the worker with the throttling on and off in turn, so the table shows how much each was really slowed.

Times are marks' ``startTime`` (ms after navigation start), so browser launch is not counted.
A benchmark, not a test: it prints figures (medians, min, max, ratios) and passes no judgement.
"""

from __future__ import annotations

import argparse
import base64
import ctypes
import json
import os
import platform
import queue
import shutil
import socket
import statistics
import struct
import subprocess
import sys
import tempfile
import threading
import time
import urllib.request
from pathlib import Path
from urllib.parse import urlparse

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "browser"))

from harness import CHROMIUM, Browser, Server, build  # noqa: E402

sys.path.insert(0, str(ROOT))
from build import NODE_RUNTIME, cache_dir, fetch_runtime, read_runtime  # noqa: E402

BARE = Path(__file__).resolve().parent / "bare"
# An invented teaching gas (not a patient): chronic CO2 retention with an acute rise.
BLOOD_GAS = {
    "calc": "blood_gas",
    "inputs": {
        "ph": 7.31,
        "pco2": {"value": 9.1, "unit": "kPa"},
        "hco3": {"value": 33, "unit": "mmol/L"},
        "po2": {"value": 7.4, "unit": "kPa"},
        "fio2": 0.28,
        "na": {"value": 138, "unit": "mmol/L"},
        "cl": {"value": 96, "unit": "mmol/L"},
    },
}
APP_VISIT = (
    "while (!window.tidewell) await new Promise((r) => setTimeout(r, 5));"
    "const engine = window.tidewell.engine;"
    "await Promise.race([window.tidewell.ready, new Promise((_, reject) => {"
    "  const check = () => engine.state === 'failed' && reject(new Error(engine.failure));"
    "  check(); engine.addEventListener('state', check); })]);"
    "const response = await window.tidewell.compute(arguments[0]);"
    "const mark = (name) => (performance.getEntriesByName(name)[0] || {}).startTime;"
    "return {done: mark('tidewell:first-result'), ready: mark('tidewell:engine-ready'),"
    "        shell: mark('tidewell:shell-ready'), ok: response.ok, info: window.tidewell.engine.info,"
    "        origin: performance.timeOrigin};"
)
BARE_VISIT = (
    "while (!window.bare) await new Promise((r) => setTimeout(r, 5));"
    "const info = await window.bare.ready;"
    "const t = performance.getEntriesByName('bare:engine-ready')[0].startTime;"
    "return {done: t, ready: t, ok: true, info, origin: performance.timeOrigin};"
)
# a CPU-bound loop: the same source is timed in the page and in the worker
SPIN = (
    "(() => { const t0 = performance.now(); let x = 0;"
    " for (let i = 0; i < 4e6; i++) x = (x + i * i) % 1000003;"
    " return performance.now() - t0; })()"
)
VISITS = ("cold", "warm", "warm+", "offline")
# the parts of a start shown for the warm and offline visits (the worker's own timings, ms)
PARTS = {
    "worker_created": "worker created",
    "before_start": "worker module loading",
    "snapshot_tried": "looking for the snapshot",
    "snapshot_read": "snapshot read (from start)",
    "snapshot_checked": "snapshot sha256 checked (from start)",
    "snapshot_awaited": "snapshot needed by loadPyodide (from start)",
    "runtime": "loadPyodide (snapshot: restore)",
    "install": "install tidewell",
    "import": "import tidewell",
}
ROUTES = ("zip", "unpack", "loadPackage", "micropip")
ARMS = ("bare", "shipped", "app", "snapshot")
# (numerator, denominator) of the ratios shown, each taken run by run
RATIOS = (
    ("snapshot", "bare"),
    ("snapshot", "shipped"),
    ("snapshot", "app"),
    ("app", "bare"),
    ("app", "shipped"),
)
PAGES = {
    "bare": ("bare/", "bare"),
    "shipped": ("bare-shipped/", "bare"),
    "app": ("?engine-timeout=900000&snapshot=off", "app"),
    "snapshot": ("?engine-timeout=900000", "app"),
}
WAIT_SNAPSHOT = (
    "const url = new URL('./pyodide/engine.snapshot', location.href).href;"
    "while (!(await caches.match(url))) await new Promise((r) => setTimeout(r, 100));"
    "return true;"
)


# -- the DevTools websocket (standard library only) --------------------------------------------------
class DevTools:
    """A small client for the browser's DevTools websocket, flat sessions, events to handlers."""

    def __init__(self, address: str):
        with urllib.request.urlopen(f"http://{address}/json/version", timeout=10) as reply:
            url = urlparse(json.load(reply)["webSocketDebuggerUrl"])
        self.sock = socket.create_connection((url.hostname, url.port), timeout=30)
        key = base64.b64encode(os.urandom(16)).decode()
        self.sock.sendall(
            f"GET {url.path} HTTP/1.1\r\nHost: {url.hostname}:{url.port}\r\nUpgrade: websocket\r\n"
            f"Connection: Upgrade\r\nSec-WebSocket-Key: {key}\r\nSec-WebSocket-Version: 13\r\n\r\n".encode()
        )
        head = b""
        while b"\r\n\r\n" not in head:
            chunk = self.sock.recv(4096)
            if not chunk:
                raise ConnectionError("DevTools closed the connection during the handshake")
            head += chunk
        status, _, rest = head.partition(b"\r\n")
        if b" 101 " not in status:
            raise ConnectionError(f"DevTools refused the websocket: {status.decode(errors='replace')}")
        self.buffer = rest.split(b"\r\n\r\n", 1)[1]
        self.sock.settimeout(None)
        self.lock = threading.Lock()
        self.next_id = 0
        self.waiting: dict[int, queue.Queue] = {}
        self.handlers: list = []
        threading.Thread(target=self._reader, daemon=True).start()

    def _take(self, n: int) -> bytes:
        while len(self.buffer) < n:
            chunk = self.sock.recv(1 << 16)
            if not chunk:
                raise ConnectionError("DevTools closed the connection")
            self.buffer += chunk
        data, self.buffer = self.buffer[:n], self.buffer[n:]
        return data

    def _message(self) -> str:
        parts = []
        while True:
            b0, b1 = self._take(2)
            n = b1 & 0x7F
            if n == 126:
                n = struct.unpack(">H", self._take(2))[0]
            elif n == 127:
                n = struct.unpack(">Q", self._take(8))[0]
            payload = self._take(n)
            opcode = b0 & 0x0F
            if opcode == 8:
                raise ConnectionError("DevTools closed the connection")
            if opcode in (9, 10):  # ping, pong
                continue
            parts.append(payload)
            if b0 & 0x80:
                return b"".join(parts).decode()

    def _reader(self) -> None:
        try:
            while True:
                message = json.loads(self._message())
                if "id" in message:
                    waiter = self.waiting.pop(message["id"], None)
                    if waiter:
                        waiter.put(message)
                else:
                    for handler in list(self.handlers):
                        handler(message)
        except (ConnectionError, OSError, ValueError):
            for waiter in list(self.waiting.values()):
                waiter.put({"error": {"message": "DevTools connection closed"}})

    def send(self, method: str, params: dict | None = None, session: str | None = None, wait: bool = True):
        message = {"method": method, "params": params or {}}
        if session:
            message["sessionId"] = session
        waiter: queue.Queue = queue.Queue()
        with self.lock:
            self.next_id += 1
            message["id"] = self.next_id
            if wait:
                self.waiting[self.next_id] = waiter
            data = json.dumps(message).encode()
            mask = os.urandom(4)
            n = len(data)
            if n < 126:
                head = bytes([0x81, 0x80 | n])
            elif n < 65536:
                head = bytes([0x81, 0x80 | 126]) + struct.pack(">H", n)
            else:
                head = bytes([0x81, 0x80 | 127]) + struct.pack(">Q", n)
            self.sock.sendall(head + mask + bytes(b ^ mask[i % 4] for i, b in enumerate(data)))
        if not wait:
            return None
        reply = waiter.get(timeout=120)
        if "error" in reply:
            raise RuntimeError(f"{method}: {reply['error'].get('message')}")
        return reply.get("result", {})

    def close(self) -> None:
        try:
            self.sock.close()
        except OSError:
            pass


# -- slowing one OS thread (the worker) as Chromium slows the page --------------------------------------
_libc = ctypes.CDLL(None, use_errno=True)
_libc.ptrace.argtypes = [ctypes.c_long, ctypes.c_long, ctypes.c_void_p, ctypes.c_void_p]
_libc.ptrace.restype = ctypes.c_long
PTRACE_CONT, PTRACE_DETACH, PTRACE_SEIZE, PTRACE_INTERRUPT = 7, 17, 0x4206, 0x4207
WAIT_ALL = 0x40000000  # __WALL: wait for a thread of another process
PTRACE_EVENT_STOP = 128


def _ptrace(request: int, tid: int, data: int = 0) -> None:
    if _libc.ptrace(request, tid, None, ctypes.c_void_p(data)) == -1:
        err = ctypes.get_errno()
        raise OSError(err, os.strerror(err))


class ThreadThrottle(threading.Thread):
    """Slow one OS thread by ``rate``: let it run a slice of wall time, hold it (rate - 1) slices."""

    def __init__(self, tid: int, rate: float, slice_s: float = 0.005):
        super().__init__(daemon=True)
        self.tid, self.rate, self.slice = tid, rate, slice_s
        self.finish = threading.Event()
        self.seized = threading.Event()
        self.active = threading.Event()  # cleared: the thread runs free (for the before/after check)
        self.active.set()
        self.error: OSError | None = None
        self.ran = self.held = 0.0

    def _hold(self) -> bool:
        """Stop the thread (a signal arriving first is passed on); False once it has exited."""
        _ptrace(PTRACE_INTERRUPT, self.tid)
        while True:
            _, status = os.waitpid(self.tid, WAIT_ALL)
            if os.WIFEXITED(status) or os.WIFSIGNALED(status):
                return False
            if status >> 16 == PTRACE_EVENT_STOP:
                return True
            _ptrace(PTRACE_CONT, self.tid, os.WSTOPSIG(status))

    def run(self) -> None:
        try:
            _ptrace(PTRACE_SEIZE, self.tid)
        except OSError as exc:
            self.error = exc
            return
        finally:
            self.seized.set()
        try:
            while not self.finish.is_set():
                if not self.active.is_set():
                    time.sleep(self.slice)
                    continue
                t0 = time.monotonic()
                time.sleep(self.slice)
                if not self._hold():
                    return
                t1 = time.monotonic()
                self.ran += t1 - t0
                time.sleep((self.rate - 1) * (t1 - t0))
                self.held += time.monotonic() - t1
                _ptrace(PTRACE_CONT, self.tid)
            if self._hold():
                _ptrace(PTRACE_DETACH, self.tid)
        except (OSError, ChildProcessError):
            return  # the thread (the worker) has gone


def worker_threads(profile: str) -> set[int]:
    """Thread ids of every dedicated-worker thread in the renderers of this browser profile."""
    tids = set()
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            cmdline = (entry / "cmdline").read_bytes()
            if b"--type=renderer" not in cmdline or profile.encode() not in cmdline:
                continue
            for task in (entry / "task").iterdir():
                if (task / "comm").read_text().strip() == "DedicatedWorker":
                    tids.add(int(task.name))
        except OSError:
            continue
    return tids


class Instrumented:
    """A Browser with a DevTools connection: throttles the page and every worker it starts."""

    def __init__(self, rate: float):
        self.rate = rate
        self.browser = Browser()
        # a throttled cold start on a busy machine can outlast Selenium's 120 s read timeout
        config = getattr(self.browser.driver.command_executor, "client_config", None)
        if config is not None:
            config.timeout = 600
        self.throttles: list[ThreadThrottle] = []
        self.seen: set[int] = set()
        self.workers: list[str] = []  # DevTools sessions of the workers, newest last
        self.problems: list[str] = []
        address = self.browser.driver.capabilities["goog:chromeOptions"]["debuggerAddress"]
        self.devtools = DevTools(address)
        self.devtools.handlers.append(self._event)
        page = next(t for t in self.devtools.send("Target.getTargets")["targetInfos"] if t["type"] == "page")
        self.page = self.devtools.send(
            "Target.attachToTarget", {"targetId": page["targetId"], "flatten": True}
        )["sessionId"]
        if rate > 1:
            self.devtools.send("Emulation.setCPUThrottlingRate", {"rate": rate}, session=self.page)
        self.devtools.send(
            "Target.setAutoAttach",
            {"autoAttach": True, "waitForDebuggerOnStart": True, "flatten": True},
            session=self.page,
        )

    def _event(self, message: dict) -> None:
        if message.get("method") != "Target.attachedToTarget":
            return
        params = message["params"]
        session, kind = params["sessionId"], params["targetInfo"]["type"]
        if kind == "worker":
            threading.Thread(target=self._start_worker, args=(session,), daemon=True).start()
        else:
            self.devtools.send("Runtime.runIfWaitingForDebugger", session=session, wait=False)

    def _start_worker(self, session: str) -> None:
        """The worker is paused before its first line: slow its thread, then let it run."""
        try:
            if self.rate > 1:
                new: set[int] = set()
                deadline = time.monotonic() + 5
                while not new and time.monotonic() < deadline:
                    new = worker_threads(self.browser.profile) - self.seen
                    if not new:
                        time.sleep(0.01)
                self.seen |= new
                if len(new) != 1:
                    self.problems.append(f"expected one new worker thread, found {sorted(new)}")
                for tid in new:
                    throttle = ThreadThrottle(tid, self.rate)
                    throttle.start()
                    throttle.seized.wait(5)
                    if throttle.error:
                        self.problems.append(f"could not hold worker thread {tid}: {throttle.error}")
                    self.throttles.append(throttle)
            self.workers.append(session)
        finally:
            self.devtools.send("Runtime.runIfWaitingForDebugger", session=session, wait=False)

    def spin(self) -> dict:
        """The CPU-bound loop timed in the page and in the newest worker (ms)."""
        page = self.browser.js(f"return {SPIN}")
        worker = None
        if self.workers:
            result = self.devtools.send(
                "Runtime.evaluate", {"expression": SPIN, "returnByValue": True}, session=self.workers[-1]
            )
            worker = result["result"].get("value")
        return {"page": page, "worker": worker}

    def check(self, rounds: int = 3) -> dict:
        """The CPU loop with the throttling on and off in turn, in the page and the newest worker.

        Returns the median ratio (on / off) for each: the factor by which the throttling really slowed it.
        """
        times: dict[str, dict[bool, list[float]]] = {
            "page": {True: [], False: []},
            "worker": {True: [], False: []},
        }
        for _ in range(rounds):
            for on in (True, False):
                self.devtools.send(
                    "Emulation.setCPUThrottlingRate", {"rate": self.rate if on else 1}, session=self.page
                )
                for throttle in self.throttles:
                    (throttle.active.set if on else throttle.active.clear)()
                got = self.spin()
                for where in ("page", "worker"):
                    if got[where] is not None:
                        times[where][on].append(got[where])
        self.devtools.send("Emulation.setCPUThrottlingRate", {"rate": self.rate}, session=self.page)
        for throttle in self.throttles:
            throttle.active.set()
        return {
            where: statistics.median(t[True]) / statistics.median(t[False])
            for where, t in times.items()
            if t[True] and t[False]
        }

    def quit(self) -> None:
        for throttle in self.throttles:
            throttle.finish.set()
        for throttle in self.throttles:
            throttle.join(2)
        self.devtools.close()
        self.browser.quit()


def series(dist: Path, arm: str, rate: float, *, warm_plus: bool, routes: bool) -> dict:
    """One fresh profile and server; the visits of one page (an arm). Figures in ms."""
    server = Server(dist).start()
    inst = Instrumented(rate)
    browser = inst.browser
    # the app's own start-up watchdog (30 s once a service worker controls the page) is for people, not
    # for a benchmark on a loaded machine: a long one, so a slow start is measured, not failed
    path, kind = PAGES[arm]
    url = server.url + path
    script, timeout = (BARE_VISIT, 300) if kind == "bare" else (APP_VISIT, 300)
    args = () if kind == "bare" else (BLOOD_GAS,)
    out: dict = {"arm": arm, "rate": rate}
    problems = []
    try:
        for visit in VISITS:
            if visit == "warm+" and not warm_plus:
                continue
            if visit == "offline":
                server.stop()
            browser.get("about:blank")
            browser.get(url)
            got = browser.wait_js(script, *args, timeout=timeout)
            if not got["ok"]:
                raise RuntimeError(f"{arm} {visit}: the request failed: {got}")
            out[visit] = got["done"]
            out[f"{visit}:ready"] = got["ready"]
            if "shell" in got:
                out[f"{visit}:shell"] = got["shell"]
            for key, value in got["info"]["timings_ms"].items():
                out[f"{visit}:{key}"] = value
            if "time_origin" in got["info"]:  # when the page created the worker, on the page's clock
                out[f"{visit}:worker_created"] = got["info"]["time_origin"] - got["origin"]
            if "start" in got["info"]:
                out[f"{visit}:start"] = got["info"]["start"]
                wanted = "snapshot" if arm == "snapshot" and visit != "cold" else "normal"
                if got["info"]["start"] != wanted:
                    problems.append(f"{visit}: started {got['info']['start']} ({got['info']['start_note']})")
            if visit == "cold":
                browser.wait_controlled(timeout=timeout)
                if arm == "snapshot":  # stored after the first start, for the next one
                    browser.wait_js(WAIT_SNAPSHOT, timeout=timeout)
            if visit == "warm+" and routes and arm == "app":
                for route in ROUTES:
                    browser.get(f"{url}&install={route}")
                    got = browser.wait_js(script, *args, timeout=timeout)
                    out[f"route:{route}"] = got["info"]["timings_ms"]["install"]
                browser.get(url)
                browser.wait_js(script, *args, timeout=timeout)
        spin = inst.spin()
        out["spin:page"], out["spin:worker"] = spin["page"], spin["worker"]
        if rate > 1:  # the same loop with the throttling on and off in turn: the factor really applied
            factors = inst.check()
            out["factor:page"], out["factor:worker"] = factors.get("page"), factors.get("worker")
        problems += browser.severe() + inst.problems
        if problems:
            out["problems"] = problems
    finally:
        inst.quit()
        server.stop()
    return out


def with_bare(dist: Path, into: Path) -> Path:
    """A copy of the build with bench/bare/ as its bare/ folder (the app's own files untouched).

    bare/pyodide/ holds the runtime as released in the pinned npm package: the build ships its own
    python_stdlib.zip (start-up modules compiled), and the baseline is Pyodide without that. The
    lock file is the build's (trimmed to the packages shipped), as the baseline always had.
    """
    target = into / "site"
    shutil.copytree(dist, target)
    shutil.copytree(BARE, target / "bare")
    runtime = target / "bare" / "pyodide"
    runtime.mkdir()
    for name, data in read_runtime(fetch_runtime(cache_dir())).items():
        if name in ("pyodide.mjs", "pyodide.asm.js", "pyodide.asm.wasm", "python_stdlib.zip"):
            (runtime / name).write_bytes(data)
    shutil.copy(dist / "pyodide" / "pyodide-lock.json", runtime / "pyodide-lock.json")
    # the same page on the runtime the app ships (its compiled standard library)
    shutil.copytree(BARE, target / "bare-shipped")
    shipped = target / "bare-shipped" / "pyodide"
    shipped.mkdir()
    for name in NODE_RUNTIME:
        shutil.copy(dist / "pyodide" / name, shipped / name)
    return target


def loadavg() -> str:
    path = Path("/proc/loadavg")
    return " ".join(path.read_text().split()[:3]) if path.exists() else "unknown"


def summarise(runs: list[dict[str, dict]], rate: float) -> dict:
    """Medians of each arm, and the medians of the run-by-run ratios (RATIOS)."""
    rows = {}
    keys = [
        *VISITS,
        "warm:shell",
        "warm+:shell",
        *(f"{visit}:{part}" for visit in ("warm", "offline") for part in PARTS),
        "spin:page",
        "spin:worker",
        "factor:page",
        "factor:worker",
    ]
    for key in keys:
        values = {
            arm: [run[arm][key] for run in runs if run.get(arm, {}).get(key) is not None] for arm in ARMS
        }
        if not any(values.values()):
            continue
        row: dict = {"n": max(len(v) for v in values.values())}
        for arm, got in values.items():
            row[arm] = statistics.median(got) if got else None
            row[f"{arm}_range"] = [min(got), max(got)] if got else None
        if key in VISITS:
            for num, den in RATIOS:
                ratios = [
                    run[num][key] / run[den][key]
                    for run in runs
                    if run.get(num, {}).get(key) and run.get(den, {}).get(key)
                ]
                row[f"{num}/{den}"] = statistics.median(ratios) if ratios else None
                row[f"{num}/{den}:runs"] = [round(r, 3) for r in ratios]
        rows[key] = row
    return {"rate": rate, "rows": rows}


def show(summary: dict) -> None:
    rate = summary["rate"]
    title = "unthrottled" if rate == 1 else f"CPU throttled {rate:g}x (page by CDP, worker thread held)"
    print(
        f"\n{title}; ms after navigation start (bare, shipped: 1+1 answered; app, snapshot: first blood_gas)"
    )
    ratio_names = [f"{n}/{d}" for n, d in RATIOS]
    print(
        f"{'':<42}"
        + "".join(f"{arm:>9}" for arm in ARMS)
        + f"{'snapshot min-max':>18}"
        + "".join(f"{r:>17}" for r in ratio_names)
    )
    for key, row in summary["rows"].items():
        f = ".2f" if key.startswith("factor:") else ".0f"
        visit, _, part = key.partition(":")
        label = {
            "warm:shell": "warm: app shell-ready",
            "warm+:shell": "warm+: app shell-ready",
            **({key: f"{visit}: {PARTS[part]}"} if part in PARTS else {}),
            "spin:page": "CPU loop in the page",
            "spin:worker": "CPU loop in the worker",
            "factor:page": "factor applied, page",
            "factor:worker": "factor applied, worker",
        }.get(key, key)
        cells = "".join(f"{row[arm]:>9{f}}" if row.get(arm) is not None else f"{'-':>9}" for arm in ARMS)
        spread = row.get("snapshot_range")
        spread = f"{spread[0]:{f}}-{spread[1]:{f}}" if spread else ""
        ratios = "".join(f"{row[r]:>17.3f}" if row.get(r) is not None else f"{'':>17}" for r in ratio_names)
        print(f"{label:<42}{cells}{spread:>18}{ratios}")
    for key, row in summary["rows"].items():
        if key in VISITS:
            runs = "; ".join(
                f"{r} " + " ".join(f"{x:.2f}" for x in row.get(f"{r}:runs", [])) for r in ratio_names
            )
            print(f"  {key} run ratios: {runs}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=5, help="pairs of series per throttling rate")
    parser.add_argument("--rates", default="1,4", help="CPU throttling rates, comma-separated (1 = none)")
    parser.add_argument("--quick", action="store_true", help="one pair, unthrottled (for CI)")
    parser.add_argument("--warm-plus", action="store_true", help="also a 3rd visit before going offline")
    parser.add_argument("--dist", type=Path, default=ROOT / "dist")
    parser.add_argument("--routes", action="store_true", help="also time the worker's install routes (app)")
    parser.add_argument("--json", type=Path, help="also write every series and the summaries here")
    parser.add_argument("--arms", default=",".join(ARMS), help="which pages to run (default: all four)")
    parser.add_argument("--show", type=Path, help="only print the tables of an earlier --json file")
    parser.add_argument(
        "--check-throttle", action="store_true", help="only: the CPU loop with throttling on and off, 5 times"
    )
    args = parser.parse_args()
    if args.show:
        return show_file(args.show)
    if args.check_throttle:
        return check_throttle(args.dist, float(args.rates.split(",")[-1]))
    runs = 1 if args.quick else args.runs
    rates = [1.0] if args.quick else [float(r) for r in args.rates.split(",")]
    if not (args.dist / "build-manifest.json").exists():
        build(args.dist)
    build_id = json.loads((args.dist / "build-manifest.json").read_text())["build_id"]
    chromium = subprocess.run([CHROMIUM, "--version"], capture_output=True, text=True).stdout.strip()
    print(f"build {build_id}; {chromium}; {platform.machine()}, {os.cpu_count()} CPUs")
    print(
        f"{runs} run(s) of every arm per rate, rates {', '.join(f'{r:g}' for r in rates)}; "
        f"load average {loadavg()}"
    )
    everything: dict = {"build_id": build_id, "chromium": chromium, "cpus": os.cpu_count(), "series": []}
    summaries = []
    with tempfile.TemporaryDirectory(prefix="tidewell-bench-") as tmp:
        site = with_bare(args.dist, Path(tmp))
        arms = [a for a in args.arms.split(",") if a in ARMS]
        for rate in rates:
            runs_done: list[dict[str, dict]] = []
            for i in range(runs):
                order = arms[i % len(arms) :] + arms[: i % len(arms)]
                got = {}
                for arm in order:
                    t = time.monotonic()
                    got[arm] = series(
                        site, arm, rate, warm_plus=args.warm_plus or args.routes, routes=args.routes
                    )
                    s = got[arm]
                    figures = ", ".join(f"{v} {s[v]:.0f}" for v in VISITS if v in s)
                    spin = f"spin page {s['spin:page']:.0f} worker {s['spin:worker'] or 0:.0f}"
                    print(
                        f"  rate {rate:g} run {i + 1}/{runs} {arm:<8}: {figures}; {spin} "
                        f"({time.monotonic() - t:.0f} s, load {loadavg()})",
                        flush=True,
                    )
                    for problem in s.get("problems", []):
                        print(f"    ! {problem}")
                    everything["series"].append(s)
                runs_done.append(got)
                if args.json:  # after every run, so a run cut short keeps what it measured
                    write_json(args.json, everything, [*summaries, summarise(runs_done, rate)])
            summaries.append(summarise(runs_done, rate))
    for summary in summaries:
        show(summary)
    print(f"\n(load average at the end: {loadavg()}; other work on the machine slows every figure)")
    if args.json:
        write_json(args.json, everything, summaries)
    return 0


def check_throttle(dist: Path, rate: float) -> int:
    """The bare page, warm; the CPU loop timed with the throttling on and off in turn (5 rounds)."""
    with tempfile.TemporaryDirectory(prefix="tidewell-bench-") as tmp:
        server = Server(with_bare(dist, Path(tmp))).start()
        inst = Instrumented(rate)
        try:
            inst.browser.get(server.url + "bare/")
            inst.browser.wait_js(BARE_VISIT, timeout=600)
            factors = inst.check(rounds=5)
        finally:
            inst.quit()
            server.stop()
    print(f"throttling {rate:g}x, load average {loadavg()}: the CPU loop was slowed by")
    for where, factor in factors.items():
        print(f"  {where}: {factor:.2f}x (median on / median off, 5 rounds each)")
    return 0


def write_json(path: Path, everything: dict, summaries: list[dict]) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(json.dumps({**everything, "summaries": summaries}, indent=1) + "\n")


def show_file(path: Path) -> int:
    """Print the tables of a --json file again (also of a run cut short)."""
    data = json.loads(path.read_text())
    for summary in data["summaries"]:
        show(summary)
    return 0


if __name__ == "__main__":
    sys.exit(main())
