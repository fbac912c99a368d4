// Where to go after sign-in: only a page of ours. Pure.
//
// The value is resolved the way a browser will resolve it (WHATWG URL: a backslash counts as a
// slash, tabs and newlines are dropped, so "/\evil.example" and "/\t/evil.example" both become
// "//evil.example"), and kept only when it stays on our origin. What is returned is the resolved
// path, never the raw text, so the browser cannot read it differently (OWASP Unvalidated Redirects
// and Forwards Cheat Sheet).
export const HOME = "/";

export function safeNext(next: string | null | undefined, origin: string): string {
  if (!next) return HOME;
  let url: URL;
  let ours: URL;
  try {
    ours = new URL(origin);
    url = new URL(next, ours);
  } catch {
    return HOME;
  }
  if (url.origin !== ours.origin || (url.protocol !== "http:" && url.protocol !== "https:")) return HOME;
  // "/./\evil.example" resolves to our origin with the path "//evil.example", which read again
  // on its own is another site: a path must not start with two slashes.
  if (url.pathname.startsWith("//")) return HOME;
  return `${url.pathname}${url.search}${url.hash}`;
}
