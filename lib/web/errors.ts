import { ZodError } from "zod";
import { BODY_CAPS, capWords, mediaType, readCappedBody } from "./api/body";
import { AppError, type ErrorCode } from "../domain/errors";

export { AppError, type ErrorCode };

// One table from error code to HTTP status for the whole API.
export const statusOf: Record<ErrorCode, number> = {
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unsupported_media: 415,
  invalid: 422,
  bad_request: 400,
  internal: 500,
};

export type ErrorBody = { error: { code: ErrorCode; message: string; field?: string } };

// PostgreSQL's data exceptions (SQLSTATE class 22, PostgreSQL manual appendix A) that a value the
// schemas should have refused can still raise. A backstop only: lib/domain/validation names the field first.
const DATA_ERRORS: Record<string, string> = {
  "22021": "A text has a character that cannot be stored (such as a NUL byte); remove it and try again.",
  "22P05": "A text has a character that cannot be stored (such as a NUL byte); remove it and try again.",
  "22003": "A number is too large or too small to be stored; check the amounts.",
  "22008": "A date is outside the range that can be stored; check the year.",
  "22007": "A date could not be read; give it like 2025-05-01T14:30:00Z.",
  // JavaScript writes years past 9999 as "+275760-…", which PostgreSQL reads as a bad zone offset.
  "22009": "A date is outside the range that can be stored; check the year.",
};

/** A PostgreSQL data exception as a 422 without internals, or null. Drizzle wraps the driver's
 * error, so the SQLSTATE may sit on the error or on its cause. */
export function dataError(err: unknown): AppError | null {
  const codeOf = (e: unknown) => (e && typeof e === "object" && "code" in e && typeof e.code === "string" ? e.code : undefined);
  const code = codeOf(err) ?? codeOf((err as { cause?: unknown } | null)?.cause);
  const message = code ? DATA_ERRORS[code] : undefined;
  if (!message) return null;
  console.warn(`[wormward:api] a value reached the database and was refused there (SQLSTATE ${code}); a schema in lib/domain/validation should have caught it`);
  return new AppError("invalid", message);
}

export function errorBody(err: unknown): { status: number; body: ErrorBody } {
  if (err instanceof AppError) {
    return { status: statusOf[err.code], body: { error: { code: err.code, message: err.message, field: err.field } } };
  }
  if (err instanceof ZodError) {
    const first = err.issues[0];
    const field = first?.path.join(".") || undefined;
    const message = first ? `${field ? `${field}: ` : ""}${first.message}` : "Invalid input";
    return { status: 422, body: { error: { code: "invalid", message, field } } };
  }
  const refused = dataError(err);
  if (refused) return errorBody(refused);
  console.error("[wormward:api] unexpected error:", err);
  return { status: 500, body: { error: { code: "internal", message: "Something went wrong on our side." } } };
}

export function errorResponse(err: unknown): Response {
  const { status, body } = errorBody(err);
  return Response.json(body, { status });
}

const JSON_TYPE = "application/json";

// Reads the body through the one capped reader; a larger body is a 413 before any parsing.
async function readText(req: Request, max: number): Promise<string> {
  const body = await readCappedBody(req, max);
  if (!body.ok) throw new AppError("too_large", `The body is ${body.size}; at most ${capWords(max)} are accepted.`);
  return body.bytes.toString("utf8");
}

// A JSON body must say so (application/json, RFC 8259 §11): text/plain and form types, which a page
// on another site may send without a CORS preflight (Fetch standard, CORS-safelisted request
// header), are refused before the body is read.
function requireJsonType(req: Request): void {
  const type = mediaType(req.headers.get("content-type"));
  if (type !== JSON_TYPE) {
    throw new AppError("unsupported_media", `Send JSON with Content-Type: ${JSON_TYPE}${type ? `, not ${type}` : ""}.`);
  }
}

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}

export async function readJson(req: Request, max: number = BODY_CAPS.json): Promise<unknown> {
  requireJsonType(req);
  return parseJson(await readText(req, max));
}

// For bodies that may be empty (a bare POST): empty → undefined, bad JSON → 400.
export async function readOptionalJson(req: Request): Promise<unknown> {
  const text = await readText(req, BODY_CAPS.json);
  if (!text.trim()) return undefined;
  requireJsonType(req);
  return parseJson(text);
}
