"""Helpers for the offline, update, network and injection tests.

``watch(browser)``        before any page script runs, on every document of the tab: record alert() calls,
                          ``securitypolicyviolation`` events and every (page label, engine label, build id)
                          the page goes through, in sessionStorage so the record survives reloads;
``watched(browser)``      what ``watch`` recorded;
``precache_list(site)``   the service worker's own precache list (url -> sha256), read from the built sw.js;
``served_hashes``         the sha256 of every precached file as the page gets it now (through the worker);
``case_records``          the IndexedDB case records exactly as stored (read without the page's code);
``save_case`` / ``log_labels``  the case log through the UI;
``ask_service_worker``    a message to the controlling service worker and its answer.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from screens_support import tap
from selenium.webdriver.common.by import By

WATCH_KEY = "tidewell-test:watch"
WATCH_SCRIPT = """
(() => {
  const KEY = "__KEY__";
  let storage;
  try { storage = window.sessionStorage; } catch { return; }  // a document without storage: not ours
  const empty = () => ({ alerts: [], violations: [], states: [] });
  const load = () => {
    try { return JSON.parse(storage.getItem(KEY)) || empty(); } catch { return empty(); }
  };
  const note = (kind, item) => {
    const w = load(); w[kind].push(item); storage.setItem(KEY, JSON.stringify(w));
  };
  window.alert = (message) => note("alerts", String(message));
  document.addEventListener("securitypolicyviolation", (e) => note("violations", {
    directive: e.violatedDirective, blocked: e.blockedURI, sample: e.sample, source: e.sourceFile,
    line: e.lineNumber }), true);
  // every distinct (page label, engine label, page build id) once the engine has answered ready
  let last = "";
  const look = () => {
    const t = window.tidewell;
    if (!t || !t.engine || !t.engine.info) return;
    const state = [t.label, t.engine.info.label, document.documentElement.dataset.buildId || "",
      location.href];
    const key = JSON.stringify(state.slice(0, 3));
    if (key !== last) { last = key; note("states", state); }
  };
  setInterval(look, 10);
})();
""".replace("__KEY__", WATCH_KEY)


def watch(browser) -> None:
    """Install the recorder for every document this tab loads from now on (a CDP init script)."""
    browser.driver.execute_cdp_cmd("Page.addScriptToEvaluateOnNewDocument", {"source": WATCH_SCRIPT})


def watched(browser) -> dict:
    text = browser.js(
        "try { return sessionStorage.getItem(arguments[0]); } catch { return null; }", WATCH_KEY
    )
    return json.loads(text) if text else {"alerts": [], "violations": [], "states": []}


def manifest(site: Path) -> dict:
    return json.loads((site / "build-manifest.json").read_text())


def precache_list(site: Path, name: str = "PRECACHE") -> dict[str, str]:
    """url (relative, "./...") -> sha256: the list build.py stamped into the built sw.js (``DEFERRED``:
    the files stored after the engine's first start)."""
    text = (site / "sw.js").read_text()
    match = re.search(rf"^const {name} = (\{{.*?^\}});", text, re.S | re.M)
    assert match, f"the built sw.js has no {name} object"
    return json.loads(match.group(1))


def served_hashes(browser, urls: list[str]) -> dict[str, str]:
    """url -> sha256 of what fetch() gets for it in the page now (the service worker answers)."""
    return browser.wait_js(
        "const hex = (b) => Array.from(new Uint8Array(b), (x) => x.toString(16).padStart(2, '0')).join('');"
        "const out = {};"
        "for (const url of arguments[0]) {"
        "  const r = await fetch(url);"
        "  out[url] = r.ok ? hex(await crypto.subtle.digest('SHA-256', await r.arrayBuffer()))"
        "    : 'HTTP ' + r.status; }"
        "return out;",
        urls,
        timeout=120,
    )


def cache_contents(browser) -> dict[str, list[str]]:
    """Cache Storage: cache name -> sorted paths it holds."""
    return browser.wait_js(
        "const out = {};"
        "for (const key of await caches.keys()) {"
        "  const c = await caches.open(key);"
        "  out[key] = (await c.keys()).map((r) => new URL(r.url).pathname).sort(); }"
        "return out;"
    )


def case_records(browser) -> str:
    """Every record of the case store, sorted by id, as JSON text (read with IndexedDB itself)."""
    return browser.wait_js(
        "const db = await new Promise((ok, no) => { const r = indexedDB.open('tidewell');"
        "  r.onsuccess = () => ok(r.result); r.onerror = () => no(r.error); });"
        "try {"
        "  if (!db.objectStoreNames.contains('cases')) return '[]';"
        "  const all = await new Promise((ok, no) => {"
        "    const r = db.transaction('cases').objectStore('cases').getAll();"
        "    r.onsuccess = () => ok(r.result); r.onerror = () => no(r.error); });"
        "  all.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));"
        "  return JSON.stringify(all);"
        "} finally { db.close(); }"
    )


def save_case(browser, label: str, panel: str = "blood_gas") -> None:
    """Type ``label`` and press "Save to case log" under the panel's report; the save must succeed."""
    field = browser.driver.find_element(By.ID, f"p-{panel}-label")
    browser.js("arguments[0].scrollIntoView({block: 'center'})", field)
    field.clear()
    field.send_keys(label)
    tap(browser, By.CSS_SELECTOR, f"#p-{panel}-save")
    status = browser.wait_js(
        "const s = document.querySelector('#p-' + arguments[0] + ' [role=status]');"
        "while (!/^(Saved|Not saved)/.test(s.textContent)) await new Promise((r) => setTimeout(r, 20));"
        "const text = s.textContent; s.textContent = ''; return text;",
        panel,
        timeout=20,
    )
    assert status == "Saved to the case log on this device.", status


def log_labels(browser, count: int) -> list[dict]:
    """Open the case log and wait until it lists ``count`` cases; for each: its label text and how many
    elements it holds."""
    browser.js("location.hash = 'log'")
    return browser.wait_js(
        "const want = arguments[0];"
        "for (;;) {"
        "  await new Promise((r) => setTimeout(r, 50));"
        "  const items = [...document.querySelectorAll('#log-list .log-item')];"
        "  if (document.documentElement.dataset.screen === 'log' &&"
        "      document.documentElement.dataset.logCount === String(items.length) && items.length === want)"
        "    return items.map((li) => { const p = li.querySelector('.log-label');"
        "      return { text: p.textContent, children: p.children.length, id: li.dataset.id }; }); }",
        count,
        timeout=20,
    )


def show_screen(browser, screen: str) -> None:
    """Go to a screen by its address (as a link would) and wait until the page shows it."""
    browser.wait_js(
        "location.hash = arguments[0];"
        "while (document.documentElement.dataset.screen !== arguments[0])"
        "  await new Promise((r) => setTimeout(r, 20));",
        screen,
        timeout=20,
    )


def ask_service_worker(browser, message: str) -> str:
    return browser.wait_js(
        "const sw = navigator.serviceWorker;"
        "const answer = new Promise((r) => sw.addEventListener('message', (e) => r(e.data), {once: true}));"
        "sw.controller.postMessage(arguments[0]); return await answer;",
        message,
        timeout=20,
    )


def without_engine(response: dict) -> dict:
    return {k: v for k, v in response.items() if k != "engine"}
