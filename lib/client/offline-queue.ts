import { createStore, del, set, values, type UseStore } from "idb-keyval";
import { FetchError, NO_CONNECTION, plainSentence } from "@/lib/client/fetcher";

// Log entries made with no signal wait on the phone (IndexedDB) and are sent when it returns. Each
// carries the Idempotency-Key it was given when it was made, so a send whose answer was lost and is
// sent again is stored once (lib/web/idempotency-key.ts).

/** What the form says when an entry was kept on the phone instead of sent. */
export const SAVED_ON_PHONE = "Saved on this phone; it will be sent when there is signal.";

export type EntryState =
  /** Not sent yet: no signal, or the server did not answer. */
  | "waiting"
  /** The server said the person is signed out: sent once they sign in again. */
  | "signed-out"
  /** The server refused it (the bin is gone, a conflict, a value out of range): shown until discarded. */
  | "refused";

export type WaitingEntry = {
  /** The Idempotency-Key, made when the entry was made. */
  key: string;
  /** Who made it: sent only while the same person is signed in on this phone. */
  owner: string;
  farmId: string;
  binId: string | null;
  /** The page it was made on. */
  page: string;
  url: string;
  body: unknown;
  /** The entry in a few words, for the list: "Feeding · 1.3 kg · Fresh zone". */
  what: string;
  madeAt: string;
  state: EntryState;
  refusal?: { status: number; message: string; field?: string };
};

export type Draft = { url: string; body: unknown; what: string; binId?: string | null };

const CHANGED = "wormward:waiting";
let store: UseStore | null = null;
const db = () => (store ??= createStore("wormward", "waiting-entries"));

let signedIn: { owner: string; farmId: string } | null = null;
/** The person signed in on this page and the farm it shows, set by the farm's pages. */
export function setQueueOwner(owner: string, farmId: string) {
  signedIn = { owner, farmId };
}

const changed = () => window.dispatchEvent(new Event(CHANGED));
/** Calls `fn` whenever this tab's queue changes; returns the unsubscribe. */
export function onQueueChange(fn: () => void) {
  window.addEventListener(CHANGED, fn);
  return () => window.removeEventListener(CHANGED, fn);
}

/** This person's entries on this farm, oldest first. */
export async function listEntries(owner: string, farmId: string): Promise<WaitingEntry[]> {
  const all = await values<WaitingEntry>(db());
  return all.filter((e) => e.owner === owner && e.farmId === farmId).sort((a, b) => (a.madeAt < b.madeAt ? -1 : 1));
}

export async function discardEntry(key: string) {
  await del(key, db());
  changed();
}

function newKey(): string {
  if (typeof crypto.randomUUID === "function") return crypto.randomUUID();
  return Array.from(crypto.getRandomValues(new Uint8Array(16)), (b) => b.toString(16).padStart(2, "0")).join("");
}

async function post(url: string, body: unknown, key: string): Promise<Response> {
  return fetch(url, {
    method: "POST",
    headers: { accept: "application/json", "content-type": "application/json", "Idempotency-Key": key },
    body: JSON.stringify(body),
  });
}

async function refusalOf(res: Response): Promise<{ status: number; message: string; field?: string }> {
  const e = ((await res.json().catch(() => null)) as { error?: { message?: string; field?: string } } | null)?.error;
  const said = e?.message ? plainSentence(e.message, e.field) : `The server refused it (${res.status}).`;
  // An entry sent long after it was made most often finds its bin archived or removed meanwhile.
  const message = res.status === 404 ? `${said} The bin may have been archived or removed since.` : said;
  return { status: res.status, message, field: e?.field };
}

/** A network failure (fetch's TypeError, or a phone that knows it is offline), as opposed to an answer. */
const noSignal = (err: unknown) => err instanceof TypeError || (typeof navigator !== "undefined" && navigator.onLine === false);

/**
 * Sends a new log entry with a fresh Idempotency-Key. With no signal it is kept on the phone
 * (`{ kept: true }`) to be sent later under the same key; a refusal is thrown as a FetchError with
 * the server's sentence, as send() does.
 */
export async function sendOrKeep<T>(draft: Draft): Promise<{ kept: false; value: T } | { kept: true }> {
  const key = newKey();
  const keep = async () => {
    if (!signedIn) throw new FetchError(NO_CONNECTION, 0);
    const entry: WaitingEntry = {
      key,
      owner: signedIn.owner,
      farmId: signedIn.farmId,
      binId: draft.binId ?? null,
      page: location.pathname,
      url: draft.url,
      body: draft.body,
      what: draft.what,
      madeAt: new Date().toISOString(),
      state: "waiting",
    };
    await set(key, entry, db());
    changed();
    return { kept: true } as const;
  };
  if (navigator.onLine === false) return keep();
  let res: Response;
  try {
    res = await post(draft.url, draft.body, key);
  } catch (err) {
    if (noSignal(err)) return keep();
    throw err;
  }
  if (!res.ok) {
    const r = await refusalOf(res);
    throw new FetchError(r.message, r.status, r.field);
  }
  return { kept: false, value: (await res.json()) as T };
}

let flushing: Promise<{ sent: WaitingEntry[] }> | null = null;

/** Sends this person's waiting entries once each, in the order they were made; what was sent leaves
 * the queue. One run at a time per tab; another tab sending the same entry is harmless (same key). */
export function sendWaiting(owner: string, farmId: string): Promise<{ sent: WaitingEntry[] }> {
  flushing ??= (async () => {
    const sent: WaitingEntry[] = [];
    try {
      for (const e of await listEntries(owner, farmId)) {
        if (e.state === "refused") continue;
        let res: Response;
        try {
          res = await post(e.url, e.body, e.key);
        } catch {
          break; // no signal yet: the rest wait too
        }
        if (res.ok) {
          await del(e.key, db());
          sent.push(e);
        } else if (res.status === 401) {
          await set(e.key, { ...e, state: "signed-out" }, db());
        } else if (res.status >= 400 && res.status < 500 && res.status !== 408 && res.status !== 429) {
          // The bin was archived or removed (404), a conflict (409), a value refused (422), or no longer allowed (403).
          await set(e.key, { ...e, state: "refused", refusal: await refusalOf(res) }, db());
        }
        // 408, 429 and 5xx: the server is busy or failing; it stays waiting and goes again later.
      }
    } finally {
      flushing = null;
      changed();
    }
    return { sent };
  })();
  return flushing;
}
