"use client";

import { useEffect, useState, useSyncExternalStore } from "react";
import { Mark } from "@/components/ui/marks";

function ageWords(ms: number) {
  const min = Math.max(0, Math.round(ms / 60_000));
  if (min < 1) return "under a minute";
  if (min < 60) return `${min} min`;
  const h = Math.round(min / 60);
  if (h < 48) return `${h} h`;
  return `${Math.round(h / 24)} days`;
}

/**
 * Says when the values on screen may be old: the phone is offline, or the service worker answered
 * with the copy kept on the phone because the network did not answer in time. `renderedAt` is when
 * the server drew this page; a kept copy carries the time it was drawn.
 */
function onConnectionChange(fn: () => void) {
  window.addEventListener("online", fn);
  window.addEventListener("offline", fn);
  return () => {
    window.removeEventListener("online", fn);
    window.removeEventListener("offline", fn);
  };
}

export function OfflineBanner({ renderedAt }: { renderedAt: string }) {
  const online = useSyncExternalStore(
    onConnectionChange,
    () => navigator.onLine,
    () => true,
  );
  const [fromPhone, setFromPhone] = useState(false);
  const [now, setNow] = useState(() => Date.parse(renderedAt));

  useEffect(() => {
    const sw = "serviceWorker" in navigator ? navigator.serviceWorker : null;
    const heard = (e: MessageEvent) => {
      if (e.data?.type === "wormward:served") setFromPhone(Boolean(e.data.savedAt));
    };
    sw?.addEventListener("message", heard);
    sw?.controller?.postMessage({ type: "wormward:how-served" });
    const tick = () => setNow(Date.now());
    const first = setTimeout(tick, 0);
    const every = setInterval(tick, 30_000);
    return () => {
      clearTimeout(first);
      clearInterval(every);
      sw?.removeEventListener("message", heard);
    };
  }, []);

  if (online && !fromPhone) return null;
  const at = new Date(renderedAt);
  const time = at.toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" });
  return (
    <div role="status" className="flex flex-wrap items-center gap-x-3 gap-y-1 bg-straw-100 px-4 py-2 font-bold text-soil-900 ring-1 ring-straw-600">
      <span className="flex items-center gap-2">
        <Mark name="offline" />
        Offline — values from {time}, {ageWords(now - at.getTime())} ago
      </span>
      {online && (
        <button type="button" onClick={() => location.reload()} className="min-h-11 rounded-lg px-2 underline underline-offset-4">
          Load new values
        </button>
      )}
    </div>
  );
}
