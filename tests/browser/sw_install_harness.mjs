// Runs webshell/sw.js's install handler under node with an in-memory Cache Storage and a fake network,
// so the refusal of a file whose hash does not match can be checked without a browser.
// Usage: node sw_install_harness.mjs <sw.js template> <scenario>
//   scenario "stale-then-right": the first download is stale, the fetch past every cache is right;
//   scenario "always-wrong": every download is the wrong bytes.
// Prints one JSON line: {outcome, message, cacheKept, fetches: [[url, cacheMode], ...], messages: [...]}
// (messages: what the worker posted to the page's window while it stored: "tidewell:stored:<b>:<total>").
import { readFileSync } from "node:fs";
import { createHash } from "node:crypto";
import vm from "node:vm";

const [template, scenario] = process.argv.slice(2);
const RIGHT = "the build's bytes";
const WRONG = "a stale copy";
const sha256 = (text) => createHash("sha256").update(text).digest("hex");
const source = readFileSync(template, "utf8")
  .replace('"__BUILD_ID__"', '"b1"')
  .replace("__PRECACHE__", JSON.stringify({ "./core.whl": sha256(RIGHT) }))
  .replace("__DEFERRED__", "{}") // files stored after install (none here), where the template has them
  .replace("__SIZES__", JSON.stringify({ "./core.whl": RIGHT.length })); // as build.py writes them

class FakeRequest {
  constructor(url, init = {}) {
    this.url = typeof url === "string" ? url : url.url;
    this.cache = init.cache || "default";
  }
}
class FakeCache {
  constructor() {
    this.entries = new Map();
  }
  async match(url) {
    const body = this.entries.get(typeof url === "string" ? url : url.url);
    return body === undefined ? undefined : new Response(body);
  }
  async put(url, response) {
    this.entries.set(typeof url === "string" ? url : url.url, await response.text());
  }
  async add(request) {
    await this.put(request, await fetchFake(request));
  }
  async addAll(requests) {
    for (const r of requests) await this.add(r);
  }
}
const stores = new Map();
const fetches = [];
const messages = [];
async function fetchFake(request) {
  fetches.push([request.url, request.cache]);
  const right = scenario === "stale-then-right" && request.cache === "reload";
  return new Response(right ? RIGHT : WRONG);
}
const listeners = {};
const context = {
  caches: {
    open: async (key) => (stores.has(key) || stores.set(key, new FakeCache()), stores.get(key)),
    keys: async () => [...stores.keys()],
    delete: async (key) => stores.delete(key),
  },
  crypto: globalThis.crypto,
  Request: FakeRequest,
  Response,
  URL,
  Map,
  Set,
  Array,
  Uint8Array,
  Object,
  Error,
  fetch: fetchFake,
  self: {
    addEventListener: (type, fn) => (listeners[type] = fn),
    location: { href: "https://x/", origin: "https://x" },
    clients: { matchAll: async () => [{ postMessage: (m) => messages.push(m) }] },
  },
};
vm.createContext(context);
vm.runInContext(source, context);
let installing;
listeners.install({ waitUntil: (p) => (installing = p) });
try {
  await installing;
  const kept = stores.get("tidewell-b1");
  const body = kept && (await (await kept.match("./core.whl")).text());
  console.log(JSON.stringify({ outcome: "installed", body, cacheKept: stores.has("tidewell-b1"), fetches, messages }));
} catch (err) {
  console.log(JSON.stringify({ outcome: "refused", message: String(err.message), cacheKept: stores.has("tidewell-b1"), fetches,
    messages }));
}
