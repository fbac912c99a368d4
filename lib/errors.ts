import { ZodError } from "zod";
import { BODY_CAPS, capWords, mediaType, readCappedBody } from "./api/body";

export type ErrorCode =
  | "unauthenticated"
  | "forbidden"
  | "not_found"
  | "invalid"
  | "bad_request"
  | "conflict"
  | "too_large"
  | "unsupported_media"
  | "internal";

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

export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

export type ErrorBody = { error: { code: ErrorCode; message: string; field?: string } };

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
