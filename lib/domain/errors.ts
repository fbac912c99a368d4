// What a use case throws when it refuses: a code (which the web layer maps to an HTTP status in
// lib/web/errors.ts), a plain sentence for the person, and the field it is about.
export type ErrorCode = "unauthenticated" | "forbidden" | "not_found" | "invalid" | "bad_request" | "conflict" | "too_large" | "unsupported_media" | "internal";

export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}
