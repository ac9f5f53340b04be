"""Nothing leaves the page's origin; the server sends the headers a static host must send."""

from __future__ import annotations

import json
import urllib.request
from urllib.parse import urlsplit

from harness import ROOT

BUILD_PY_CSP = (
    "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; connect-src 'self'; "
    "worker-src 'self'; object-src 'none'; base-uri 'none'"
)
REQUEST = {"calc": "convert", "inputs": {"quantity": {"value": 40, "unit": "mmHg"}, "to": "kPa"}}


def origin(url: str) -> str:
    parts = urlsplit(url)
    return f"{parts.scheme}://{parts.netloc}"


def test_no_request_leaves_the_page_origin(make_browser, server):
    browser = make_browser(perf_log=True)
    browser.get(server.url)
    browser.wait_engine()
    browser.wait_controlled()
    assert browser.compute(REQUEST)["ok"] is True

    page = browser.js("return performance.getEntriesByType('resource').map((e) => e.name)")
    worker = [
        r["name"] for r in browser.wait_js("return (await window.tidewell.engine.diagnostics()).resources;")
    ]
    service_worker = json.loads(
        browser.wait_js(
            "const sw = navigator.serviceWorker;"
            "const answer = new Promise((r) =>"
            "  sw.addEventListener('message', (e) => r(e.data), {once: true}));"
            "sw.controller.postMessage('tidewell:resources'); return await answer;"
        ).removeprefix("tidewell:resources:")
    )
    # requests made on behalf of our documents (the browser's own new-tab page is not ours)
    cdp = [
        m["params"]["request"]["url"]
        for m in browser.performance_log()
        if m["method"] == "Network.requestWillBeSent"
        and origin(m["params"].get("documentURL", "")) == server.origin
    ]
    # each view really saw the traffic it is responsible for
    assert any(u.endswith("/js/main.js") for u in page)
    assert any(u.endswith("/pyodide/pyodide.asm.wasm") for u in worker)
    assert any(
        u.endswith("/pyodide/numpy-2.0.2-cp312-cp312-pyodide_2024_0_wasm32.whl") for u in service_worker
    )
    assert any(u.endswith("/js/core-worker.js") for u in cdp)
    everything = page + worker + service_worker + cdp
    strangers = sorted({u for u in everything if origin(u) != server.origin})
    assert strangers == [], strangers


def _get(url: str):
    with urllib.request.urlopen(url, timeout=10) as response:
        return response.status, response.headers


def test_headers_a_static_host_must_send(server, dist):
    expectations = {
        "": "text/html",
        "index.html": "text/html",
        "sw.js": "text/javascript",
        "js/core-worker.js": "text/javascript",
        "pyodide/pyodide.mjs": "text/javascript",
        "pyodide/pyodide.asm.wasm": "application/wasm",
        "pyodide/python_stdlib.zip": "application/zip",
        "manifest.webmanifest": "application/manifest+json",
        "pyodide/pyodide-lock.json": "application/json",
        "icons/icon-192.png": "image/png",
    }
    for path, mime in expectations.items():
        status, headers = _get(server.url + path)
        assert status == 200, path
        assert headers["Content-Type"].split(";")[0] == mime, path
        assert headers["Content-Security-Policy"] == BUILD_PY_CSP, path
    for path in ("", "index.html", "sw.js", "build-manifest.json"):
        assert _get(server.url + path)[1]["Cache-Control"] == "no-cache", path
    assert _get(server.url + "pyodide/pyodide.asm.wasm")[1]["Cache-Control"] is None
    # the page carries the same policy as a meta tag (for hosts that cannot set headers on HTML)
    html = (ROOT / "webshell" / "index.html").read_text()
    assert f'content="{BUILD_PY_CSP}"' in html
    assert "style=" not in html and "<script>" not in html and "onclick" not in html


def test_manifest_and_icons(dist):
    manifest = json.loads((dist / "manifest.webmanifest").read_text())
    assert manifest["name"] == "Tidewell" and manifest["display"] == "standalone"
    assert manifest["start_url"] == "./" and manifest["scope"] == "./"
    purposes = {(i["sizes"], i["purpose"]) for i in manifest["icons"]}
    assert purposes == {
        ("192x192", "any"),
        ("512x512", "any"),
        ("192x192", "maskable"),
        ("512x512", "maskable"),
    }
    for icon in [*manifest["icons"], {"src": "icons/apple-touch-icon.png", "sizes": "180x180"}]:
        data = (dist / icon["src"]).read_bytes()
        assert data[:8] == b"\x89PNG\r\n\x1a\n", icon["src"]
        width, height = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")
        assert f"{width}x{height}" == icon["sizes"], icon["src"]
