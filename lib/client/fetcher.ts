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
