export class FetchError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly field?: string,
  ) {
    super(message);
  }
}

// The one SWR fetcher: throws an Error carrying the status and the server's message.
export async function fetcher<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) {
    const e = (body as { error?: { message?: string; field?: string } } | null)?.error;
    throw new FetchError(e?.message ?? `Request failed (${res.status})`, res.status, e?.field);
  }
  return body as T;
}

/** What every form says when the request never reached us. */
export const NO_CONNECTION = "No connection: nothing was saved. Try again when you have signal.";

type Method = "POST" | "PUT" | "PATCH" | "DELETE";

/** The one way a page changes data through the JSON API: a JSON body (or a multipart form), the
 * answer parsed, and any refusal or lost connection thrown as a FetchError with the server's own
 * sentence and the field it names. */
export async function send<T = unknown>(method: Method, url: string, body?: unknown): Promise<T> {
  const init: RequestInit = { method, headers: { accept: "application/json" } };
  if (body instanceof FormData) init.body = body;
  else if (body !== undefined) {
    init.headers = { accept: "application/json", "content-type": "application/json" };
    init.body = JSON.stringify(body);
  }
  const res = await fetch(url, init).catch(() => null);
  if (!res) throw new FetchError(NO_CONNECTION, 0);
  const answer = await res.json().catch(() => null);
  if (!res.ok) {
    const e = (answer as { error?: { message?: string; field?: string } } | null)?.error;
    throw new FetchError(e?.message ?? `The server could not do that (${res.status}); try again.`, res.status, e?.field);
  }
  return answer as T;
}

/** A FetchError's sentence and field, or a plain one for anything else thrown. */
export function failureOf(err: unknown): { message: string; field?: string } {
  if (err instanceof FetchError) return { message: err.message, field: err.field };
  return { message: NO_CONNECTION };
}
