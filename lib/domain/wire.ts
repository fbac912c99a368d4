// What a value becomes on its way to the browser. JSON (RFC 8259) has no date type, so a Date is
// sent as its ISO 8601 string (ECMAScript Date.prototype.toJSON); the types say so, and a page that
// primes a client component's cache passes the same shape the API answers with.

// A mapped type over an array or a tuple keeps it an array or a tuple (TypeScript handbook,
// "Mapped Types" on arrays and tuples), so only the Dates inside change.
export type Wire<T> = T extends Date ? string : T extends object ? { [K in keyof T]: Wire<T[K]> } : T;

/** The value as the API's JSON answer would carry it: dates as ISO strings, nothing else changed. */
export function toWire<T>(value: T): Wire<T> {
  if (value instanceof Date) return value.toISOString() as Wire<T>;
  if (Array.isArray(value)) return value.map((v) => toWire(v)) as Wire<T>;
  if (value && typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) out[k] = toWire(v);
    return out as Wire<T>;
  }
  return value as Wire<T>;
}
