"use client";

import { useEffect, useState } from "react";
import { failureOf, send } from "@/lib/client/fetcher";
import type { PushKey, PushTestResult } from "@/lib/client/wire";

type State = "checking" | "unsupported" | "denied" | "off" | "on" | "busy";

function keyBytes(base64url: string) {
  const b64 = base64url.replace(/-/g, "+").replace(/_/g, "/");
  const raw = atob(b64 + "=".repeat((4 - (b64.length % 4)) % 4));
  return Uint8Array.from(raw, (c) => c.charCodeAt(0));
}

// Subscribe, unsubscribe and send a test push for this browser.
export function AlertsOnThisPhone() {
  const [state, setState] = useState<State>("checking");
  const [note, setNote] = useState<string | null>(null);

  useEffect(() => {
    (async () => {
      if (!("serviceWorker" in navigator) || !("PushManager" in window)) return setState("unsupported");
      if (Notification.permission === "denied") return setState("denied");
      // The worker is registered on every page (components/pwa/register-service-worker.tsx).
      const reg = await navigator.serviceWorker.ready;
      const sub = await reg.pushManager.getSubscription();
      setState(sub ? "on" : "off");
    })().catch((e) => {
      setNote(String(e?.message ?? e));
      setState("unsupported");
    });
  }, []);

  /** One change of this phone's subscription: busy while it runs, the old state back if it fails. */
  async function change(run: () => Promise<[State, string | null]>, before: State) {
    setState("busy");
    setNote(null);
    try {
      const [after, said] = await run();
      setState(after);
      setNote(said);
    } catch (e) {
      // The API's own sentence, or the one no-connection sentence (a push service out of reach too).
      setNote(failureOf(e).message);
      setState(before);
    }
  }

  const turnOn = () =>
    change(async () => {
      const permission = await Notification.requestPermission();
      if (permission !== "granted") return [permission === "denied" ? "denied" : "off", null];
      const { publicKey } = await send<PushKey>("GET", "/api/push/key");
      const reg = await navigator.serviceWorker.ready;
      const sub = await reg.pushManager.subscribe({ userVisibleOnly: true, applicationServerKey: keyBytes(publicKey) });
      await send("POST", "/api/push/subscriptions", sub.toJSON());
      return ["on", "Alerts will come to this phone."];
    }, "off");

  const turnOff = () =>
    change(async () => {
      const reg = await navigator.serviceWorker.ready;
      const sub = await reg.pushManager.getSubscription();
      if (sub) {
        await send("DELETE", "/api/push/subscriptions", { endpoint: sub.endpoint });
        await sub.unsubscribe();
      }
      return ["off", "This phone will get no more alerts."];
    }, "on");

  async function test() {
    setNote(null);
    try {
      const r = await send<PushTestResult>("POST", "/api/push/test");
      setNote(`Test sent to ${r.sent} phone${r.sent === 1 ? "" : "s"}.`);
    } catch (e) {
      setNote(failureOf(e).message);
    }
  }

  return (
    <section className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 className="text-lg font-bold">Alerts on this phone</h2>
      {state === "unsupported" && <p className="mt-1 text-soil-700">This browser cannot receive push alerts. Alerts still reach you by e-mail.</p>}
      {state === "denied" && (
        <p className="mt-1 text-soil-700">Notifications are blocked for this site in the browser settings. Allow them there, then come back.</p>
      )}
      {(state === "off" || state === "on" || state === "busy") && (
        <div className="mt-3 flex flex-wrap gap-2">
          {state !== "on" ? (
            <button onClick={turnOn} disabled={state === "busy"} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60">
              Send alerts here
            </button>
          ) : (
            <>
              <button onClick={turnOff} className="min-h-12 rounded-xl bg-soil-100 px-4 font-bold text-soil-900 ring-1 ring-soil-300">
                Stop alerts here
              </button>
              <button onClick={test} className="min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white">
                Send a test
              </button>
            </>
          )}
        </div>
      )}
      <p aria-live="polite" className="mt-2 min-h-6 text-sm text-soil-700">
        {note}
      </p>
    </section>
  );
}
