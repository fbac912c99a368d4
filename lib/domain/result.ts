// A computation that can refuse its input says why, in words a form can show beside the field,
// instead of returning NaN or throwing.
export type FieldError = { field: string; message: string };

export type Result<T> = { ok: true; value: T } | { ok: false; error: FieldError };

export function ok<T>(value: T): Result<T> {
  return { ok: true, value };
}

export function fail(field: string, message: string): { ok: false; error: FieldError } {
  return { ok: false, error: { field, message } };
}
