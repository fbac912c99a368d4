import { ZodError } from "zod";

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

export async function readJson(req: Request): Promise<unknown> {
  try {
    return await req.json();
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}

// For bodies that may be empty (a bare POST): empty → undefined, bad JSON → 400.
export async function readOptionalJson(req: Request): Promise<unknown> {
  const text = await req.text();
  if (!text.trim()) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}
