"use client";

import { useEffect } from "react";

/** Registers the service worker (public/sw.js) on every page: it keeps pages for a basement with no
 * signal and shows pushed alerts. A page loaded before the worker controlled it hands over the
 * files it loaded and its own address, so that page opens offline too. */
export function RegisterServiceWorker() {
  useEffect(() => {
    if (!("serviceWorker" in navigator)) return;
    const uncontrolled = !navigator.serviceWorker.controller;
    navigator.serviceWorker
      .register("/sw.js", { scope: "/" })
      .then(() => navigator.serviceWorker.ready)
      .then((reg) => {
        if (!uncontrolled) return;
        const urls = performance.getEntriesByType("resource").map((r) => r.name);
        reg.active?.postMessage({ type: "wormward:warm", urls, page: location.href });
      })
      .catch((e: unknown) => console.warn("[wormward] the service worker did not register:", e));
  }, []);
  return null;
}
