// Wormward service worker: keeps the pages a keeper opened on this phone for a basement with no
// signal, and shows alert notifications pushed by the server with a claim action.
//
// What is kept: the app's own files (/_next/static/ is content-hashed, so cache-first is safe) and
// the last copy of the signed-in pages Today, a bin and a zone. Those pages are asked of the network
// first; after PAGE_WAIT_MS without an answer (or at once when the phone says it is offline) the
// copy on the phone is shown. Nothing else is kept: no API answer, and never a write. Any sign-in or
// sign-out empties the pages, so one person's pages never open for the next.
const SHELL = "wormward-shell-v1";
const PAGES = "wormward-pages-v1";
const PAGE_WAIT_MS = 1500;
const SHELL_MAX = 400;
const SAVED_AT = "x-wormward-saved-at";
const KEPT_PAGES = [/^\/farms\/[^/]+\/?$/, /^\/farms\/[^/]+\/bins\/[^/]+\/?$/, /^\/farms\/[^/]+\/zones\/[^/]+\/?$/];
const TODAY = /^\/farms\/[^/]+\/?$/;
const SIGNED_OUT = /^\/(sign-in|sign-up|check-mail|verify|forgot|reset|join)(\/|$)/;
const STATIC = (p) => p.startsWith("/_next/static/") || /^\/icon[\w-]*\.(svg|png)$/.test(p) || p === "/manifest.webmanifest";

// Which new page (client id) was answered from the phone, and from when; asked by the page's banner.
const servedFromPhone = new Map();

self.addEventListener("install", () => self.skipWaiting());
self.addEventListener("activate", (event) =>
  event.waitUntil(
    (async () => {
      const keep = new Set([SHELL, PAGES]);
      for (const name of await caches.keys()) if (name.startsWith("wormward-") && !keep.has(name)) await caches.delete(name);
      await self.clients.claim();
    })(),
  ),
);

const forgetPages = () => caches.delete(PAGES);
const keptPage = (url) => KEPT_PAGES.some((re) => re.test(url.pathname));
const pageKey = (url) => url.origin + url.pathname + url.search;

self.addEventListener("fetch", (event) => {
  const req = event.request;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin) return;
  if (req.method !== "GET") {
    // next-auth's sign-in (callback) and sign-out posts: whoever comes next starts with no pages.
    if (url.pathname.startsWith("/api/auth/callback/") || url.pathname === "/api/auth/signout") event.waitUntil(forgetPages());
    return;
  }
  if (STATIC(url.pathname)) return event.respondWith(fromShell(event, req, url));
  if (req.mode === "navigate") return event.respondWith(page(event, url));
});

async function fromShell(event, req, url) {
  const cache = await caches.open(SHELL);
  const hit = await cache.match(req);
  // Hashed files never change; the icon and the manifest keep their names, so they are fetched
  // again behind the copy for next time.
  if (hit && !url.pathname.startsWith("/_next/static/")) {
    event.waitUntil(
      fetch(req)
        .then((res) => (res.ok ? cache.put(req, res) : undefined))
        .catch(() => undefined),
    );
  }
  if (hit) return hit;
  const res = await fetch(req);
  if (res.ok && res.type === "basic") await keepInShell(cache, req, res.clone());
  return res;
}

async function keepInShell(cache, req, res) {
  await cache.put(req, res);
  // Each release brings new hashed files; the oldest go first.
  const keys = await cache.keys();
  for (const old of keys.slice(0, Math.max(0, keys.length - SHELL_MAX))) await cache.delete(old);
}

/** Keeps a copy of a signed-in page as it came, stamped with when. */
async function remember(url, res) {
  if (!res.ok || res.redirected || res.type !== "basic") return;
  if (!(res.headers.get("content-type") || "").includes("text/html")) return;
  const headers = new Headers(res.headers);
  headers.set(SAVED_AT, new Date().toISOString());
  const copy = new Response(await res.blob(), { status: res.status, statusText: res.statusText, headers });
  await (await caches.open(PAGES)).put(pageKey(url), copy);
}

async function page(event, url) {
  const kept = keptPage(url);
  const copy = kept ? await (await caches.open(PAGES)).match(pageKey(url)) : undefined;
  const network = fetch(event.request).then(async (res) => {
    // Redirected to sign-in (or opened it): the session is over, and so are its pages.
    const landed = res.type === "opaqueredirect" ? null : new URL(res.url || url.href);
    if (SIGNED_OUT.test(url.pathname) || (landed && SIGNED_OUT.test(landed.pathname))) event.waitUntil(forgetPages());
    if (!kept || !res.ok || res.type !== "basic") return res;
    if (!copy) {
      event.waitUntil(remember(url, res.clone()).catch(() => undefined));
      return res;
    }
    // With a copy to fall back on, the race is against the whole page, not its first bytes: on a weak
    // signal the headers come quickly and the rest trickles in for seconds.
    const whole = new Response(await res.blob(), { status: res.status, statusText: res.statusText, headers: res.headers });
    event.waitUntil(remember(url, whole.clone()).catch(() => undefined));
    return whole;
  });
  event.waitUntil(network.catch(() => undefined));

  if (!copy) return network.catch(() => offline(url));
  const fromPhone = () => {
    if (servedFromPhone.size > 50) servedFromPhone.delete(servedFromPhone.keys().next().value);
    servedFromPhone.set(event.resultingClientId, copy.headers.get(SAVED_AT));
    return copy;
  };
  if (self.navigator.onLine === false) return fromPhone();
  const wait = new Promise((resolve) => setTimeout(resolve, PAGE_WAIT_MS, null));
  const first = await Promise.race([network.catch(() => null), wait]);
  return first || fromPhone();
}

/** No answer and no copy: Today's copy for the home-screen start, else a page of our own words. */
async function offline(url) {
  const cache = await caches.open(PAGES);
  const kept = [];
  for (const req of await cache.keys()) {
    const res = await cache.match(req);
    kept.push({ url: new URL(req.url), at: res ? res.headers.get(SAVED_AT) || "" : "" });
  }
  kept.sort((a, b) => (a.at < b.at ? 1 : -1));
  const today = kept.find((k) => TODAY.test(k.url.pathname));
  if (url.pathname === "/" && today) return Response.redirect(today.url.href, 302);
  const links = kept
    .map((k) => `<li><a href="${k.url.pathname}${k.url.search}">${k.url.pathname.includes("/bins/") ? "A bin" : k.url.pathname.includes("/zones/") ? "A zone" : "Today"}</a></li>`)
    .join("");
  const html = `<!doctype html><html lang="en"><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>No signal · Wormward</title>
<style>body{font:18px/1.5 system-ui,sans-serif;margin:0;padding:24px;background:#faf6ee;color:#2b1f17}a{color:#2f5d2a;display:inline-block;min-height:44px;padding:8px 0}h1{font-size:1.4em}</style>
<h1>No signal</h1><p>This page is not saved on this phone yet. Pages you opened before are:</p><ul>${links || "<li>none yet</li>"}</ul>
<p><a href="${url.pathname}${url.search}">Try again</a></p></html>`;
  return new Response(html, {
    status: 503,
    headers: { "content-type": "text/html; charset=utf-8", "content-security-policy": "default-src 'none'; style-src 'unsafe-inline'; img-src 'self'" },
  });
}

self.addEventListener("message", (event) => {
  const msg = event.data || {};
  const source = event.source;
  if (msg.type === "wormward:how-served" && source) {
    source.postMessage({ type: "wormward:served", savedAt: servedFromPhone.get(source.id) || null });
  } else if (msg.type === "wormward:warm" && Array.isArray(msg.urls)) {
    event.waitUntil(warm(msg.urls, msg.page));
  }
});

/** The files and the page a page loaded before this worker controlled it, kept now. */
async function warm(urls, pageUrl) {
  const cache = await caches.open(SHELL);
  for (const u of urls) {
    const url = new URL(u, self.location.origin);
    if (url.origin !== self.location.origin || !STATIC(url.pathname) || (await cache.match(url.href))) continue;
    const res = await fetch(url.href).catch(() => null);
    if (res && res.ok) await keepInShell(cache, url.href, res);
  }
  if (!pageUrl) return;
  const url = new URL(pageUrl, self.location.origin);
  if (url.origin !== self.location.origin || !keptPage(url) || (await (await caches.open(PAGES)).match(pageKey(url)))) return;
  const res = await fetch(url.href, { credentials: "same-origin", headers: { accept: "text/html" } }).catch(() => null);
  if (res) await remember(url, res);
}

function parse(data) {
  if (!data) return {};
  try {
    return data.json();
  } catch {
    return { title: "Wormward", body: data.text() };
  }
}

self.addEventListener("push", (event) => {
  const msg = parse(event.data);
  const title = msg.title || "Wormward";
  const options = {
    body: msg.body || "",
    tag: msg.alertId || msg.kind || "wormward",
    renotify: Boolean(msg.alertId),
    requireInteraction: msg.level === "act_now",
    icon: "/icon-192.png",
    badge: "/icon.svg",
    data: { url: msg.url || "/", alertId: msg.alertId || null },
    actions: msg.alertId ? [{ action: "claim", title: "I'm on it" }] : [],
  };
  event.waitUntil(
    self.registration.showNotification(title, options).then(async () => {
      // Open pages hear about it too (the Today page refreshes; tests observe delivery).
      const pages = await self.clients.matchAll({ type: "window", includeUncontrolled: true });
      for (const p of pages) p.postMessage({ type: "wormward:push", title, options: { body: options.body, tag: options.tag, data: options.data } });
    }),
  );
});

self.addEventListener("notificationclick", (event) => {
  const { url, alertId } = event.notification.data || {};
  event.notification.close();
  const claim =
    event.action === "claim" && alertId
      ? fetch(`/api/alerts/${alertId}/claim`, { method: "POST", credentials: "same-origin" }).catch(() => null)
      : Promise.resolve();
  event.waitUntil(
    claim.then(async () => {
      const pages = await self.clients.matchAll({ type: "window", includeUncontrolled: true });
      const target = new URL(url || "/", self.location.origin).href;
      for (const p of pages) {
        if (p.url === target && "focus" in p) return p.focus();
      }
      return self.clients.openWindow(target);
    }),
  );
});
