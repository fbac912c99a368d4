export class FetchError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly field?: string,
  ) {
    super(message);
  }
}

/** What every form says when the request never reached us. */
export const NO_CONNECTION = "No connection: nothing was saved. Try again when you have signal.";
/** What a list or chart says when its read never reached us: the same words, for reading. */
export const NO_CONNECTION_READ = "No connection: this could not load. Try again when you have signal.";

type ErrorEnvelope = { error?: { code?: string; message?: string; field?: string } };

/** The parsed answer, or the API's error envelope `{ error: { code, message, field } }` thrown as a FetchError. */
async function answerOf<T>(res: Response, fallback: string): Promise<T> {
  const body = await res.json().catch(() => null);
  if (res.ok) return body as T;
  const e = (body as ErrorEnvelope | null)?.error;
  throw new FetchError(e?.message ? plainSentence(e.message, e.field) : fallback, res.status, e?.field);
}

/** The API names the field before its message ("name: Give it a name.") for callers that show the
 * message alone; a form shows it beside the field, so the name is left off there. */
export function plainSentence(message: string, field?: string): string {
  return field && message.startsWith(`${field}: `) ? message.slice(field.length + 2) : message;
}

// The one SWR fetcher: throws an Error carrying the status and the server's message; a lost
// connection is said as the forms say it, not in the browser's words ("Failed to fetch").
export async function fetcher<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } }).catch(() => null);
  if (!res) throw new FetchError(NO_CONNECTION_READ, 0);
  return answerOf<T>(res, `The server could not load this (${res.status}); try again.`);
}

type Method = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";

/** The one way a page talks to the JSON API outside SWR: a JSON body (or a multipart form), the
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
  return answerOf<T>(res, `The server could not do that (${res.status}); try again.`);
}

/** A FetchError's sentence and field, or the no-connection sentence for anything else thrown. */
export function failureOf(err: unknown): { message: string; field?: string } {
  if (err instanceof FetchError) return { message: err.message, field: err.field };
  return { message: NO_CONNECTION };
}
