import { AppError } from "@/lib/web/errors";

export const IDEMPOTENCY_HEADER = "Idempotency-Key";
const KEY = /^[A-Za-z0-9_-]{8,100}$/;

/** The phone's key for one log entry (header `Idempotency-Key`, made once with crypto.randomUUID()
 * when the entry is made), so a resend after a lost answer stores nothing twice. Absent is fine;
 * present and malformed is a 422 naming the header. */
export function idempotencyKey(req: Request): string | undefined {
  const key = req.headers.get(IDEMPOTENCY_HEADER);
  if (key === null) return undefined;
  if (!KEY.test(key)) throw new AppError("invalid", `${IDEMPOTENCY_HEADER}: use 8 to 100 letters, digits, "-" or "_".`, IDEMPOTENCY_HEADER);
  return key;
}

/** What a log use case answers: the entry, and whether this request stored it or a key seen before
 * found it. */
export type Logged<T> = { answer: T; created: boolean };

/** 201 for a new entry; 200 with the same body for a replay of a key already stored. */
export function loggedResponse<T>({ answer, created }: Logged<T>): Response {
  return Response.json(answer, { status: created ? 201 : 200 });
}
