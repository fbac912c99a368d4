// The one reader for request bodies. Every body (JSON, SenML, a CSV form) is read through it with a
// cap, so a large body costs at most the cap in memory, declared or not: a declared Content-Length
// over the cap is refused before a byte is read, and a chunked body (no Content-Length, RFC 9112
// §7.1) is read only until it passes the cap; the rest is left unread.

/** Caps per kind of body. */
export const BODY_CAPS = {
  // Our largest JSON input (a feeding with its items, a rule set) is a few KiB.
  json: 64 * 1024,
} as const;

/** The media type without parameters, lower-cased (RFC 9110 §8.3.1: type and subtype are case-insensitive). */
export const mediaType = (contentType: string | null) => (contentType ?? "").split(";")[0]!.trim().toLowerCase();

export type CappedBody = { ok: true; bytes: Buffer } | { ok: false; size: string };

/** "16384 bytes (16 KiB)", "10485760 bytes (10 MiB)": the cap in words for a 413's message. */
export function capWords(max: number): string {
  const unit = max >= 1024 * 1024 ? `${+(max / 1024 / 1024).toFixed(1)} MiB` : `${+(max / 1024).toFixed(1)} KiB`;
  return `${max} bytes (${unit})`;
}

/**
 * Reads at most `max` bytes. `{ ok: false, size }` when the body is larger (`size` says how much was
 * declared or seen); the caller answers 413 in its own words without reading further.
 */
export async function readCappedBody(req: Request, max: number): Promise<CappedBody> {
  const declared = req.headers.get("content-length");
  if (declared !== null && /^\d+$/.test(declared) && Number(declared) > max) return { ok: false, size: `${declared} bytes` };
  if (!req.body) return { ok: true, bytes: Buffer.alloc(0) };
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > max) {
      await reader.cancel().catch(() => {});
      return { ok: false, size: `more than ${max} bytes` };
    }
    chunks.push(value);
  }
  return { ok: true, bytes: Buffer.concat(chunks) };
}
