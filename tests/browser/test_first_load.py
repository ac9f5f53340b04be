"""A first visit at 360 x 740 says how far the offline copy is ("x MB of y MB stored") in plain words, and
says "Ready offline" once it is stored.

The service worker reports its bytes after each file (sw.js, ``announce``), counted from the sizes in the
build's own manifest (build-manifest.json; the manifest's own length measured). Every text the status
line and the footer's offline line take is recorded from the first document on (a CDP init script with a
MutationObserver), so none is missed however fast the install goes; the test then waits for the state it
asserts (the footer's ``data-offline`` reading ``ready``).
"""

from __future__ import annotations

import json
import re

from offline_support import precache_list
from screens_support import TALL_PHONE, phone

RECORD = """
(() => {
  window.__statusTexts = [];
  const keep = (node) => {
    const text = node.textContent.trim();
    const list = window.__statusTexts;
    if (list[list.length - 1] !== `${node.id}|${text}`) list.push(`${node.id}|${text}`);
  };
  document.addEventListener("DOMContentLoaded", () => {
    for (const id of ["engine-text", "offline-status"]) {
      const node = document.getElementById(id);
      if (!node) continue;
      keep(node);
      const watch = { childList: true, characterData: true, subtree: true };
      new MutationObserver(() => keep(node)).observe(node, watch);
    }
  });
})();
"""

PROGRESS = re.compile(r"(\d+\.\d) MB of (\d+\.\d) MB stored")
#: names of the machinery, not words a clinician uses
DEVELOPER_WORDS = re.compile(
    r"\b(engine|python|pyodide|runtime|wasm|webassembly|wheel|install\w*|cache\w*|service worker|tidewell)\b",
    re.I,
)


def precache_bytes(site) -> int:
    """Bytes of every file the service worker precaches: the manifest's sizes, the manifest's own length."""
    manifest_path = site / "build-manifest.json"
    sizes = {f"./{f['path']}": f["size"] for f in json.loads(manifest_path.read_text())["files"]}
    sizes["./build-manifest.json"] = manifest_path.stat().st_size
    return sum(sizes[url] for url in precache_list(site))


def test_first_load_says_how_many_mb_are_stored_then_ready_offline(make_browser, server, dist):
    browser = make_browser()
    browser.driver.execute_cdp_cmd("Page.addScriptToEvaluateOnNewDocument", {"source": RECORD})
    phone(browser, TALL_PHONE)
    browser.get(server.url + "#gas")
    browser.wait_js(
        "while (document.getElementById('offline-status').dataset.offline !== 'ready')"
        "  await new Promise((r) => setTimeout(r, 50));",
        timeout=240,
    )
    texts = browser.js("return window.__statusTexts")
    status = [t.split("|", 1)[1] for t in texts if t.startswith("engine-text|")]
    footer = [t.split("|", 1)[1] for t in texts if t.startswith("offline-status|")]

    # progress: numbers that only grow, out of one total, the manifest's, reached at the end
    total = f"{precache_bytes(dist) / 1e6:.1f}"
    steps = [(float(m[1]), m[2]) for t in status if (m := PROGRESS.search(t))]
    assert len(steps) >= 2, status
    assert {of for _, of in steps} == {total}, (steps, total)
    stored = [x for x, _ in steps]
    assert stored == sorted(stored) and stored[0] < stored[-1], stored
    assert f"{stored[-1]:.1f}" == total, (stored[-1], total)
    assert any(PROGRESS.search(t) for t in footer), footer  # the footer's offline line says the same

    # done: the line says so, in plain words, and never named the machinery on the way
    final = browser.js("return document.getElementById('engine-text').textContent")
    assert final == "Ready offline. Every calculation runs on this device.", final
    words = [t for t in status if DEVELOPER_WORDS.search(t)]
    assert not words, words
    assert status[0].startswith("Getting ready") and status[0].endswith("You can type values now."), status
