// Wormward service worker: shows alert notifications pushed by the server and offers a claim action.
self.addEventListener("install", () => self.skipWaiting());
self.addEventListener("activate", (event) => event.waitUntil(self.clients.claim()));

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
    icon: "/icon.svg",
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
