// Submits a page's form the way a browser without script does: every named field the server
// rendered (React's hidden action fields included), with ours filled in, posted to the page.
import { appUrl, type Session } from "./app";

const decode = (s: string) =>
  s
    .replace(/&quot;/g, '"')
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&amp;/g, "&");

const attr = (tag: string, name: string) => {
  const m = tag.match(new RegExp(`\\s${name}="([^"]*)"`));
  return m ? decode(m[1]!) : null;
};

/** The visible words of an HTML page, entities decoded, for asserting on messages. */
export function pageText(html: string): string {
  // React separates text runs with empty comments; they are not word breaks.
  return decode(
    html
      .replace(/<!--[\s\S]*?-->/g, "")
      .replace(/<script[\s\S]*?<\/script>/g, " ")
      .replace(/<[^>]+>/g, " "),
  ).replace(/\s+/g, " ");
}

export type Submitted = { status: number; location: string | null; html: string; text: string };

type Pick = string | ((formHtml: string) => boolean);

/** Loads `path` and keeps the first form that has a field named `pick` (or that `pick` accepts), to submit later, even twice. */
export async function loadForm(session: Session, path: string, pick: Pick) {
  const page = await session.fetch(path);
  if (page.status !== 200) throw new Error(`GET ${path} answered ${page.status}`);
  const html = await page.text();
  const form = [...html.matchAll(/<form\b[^>]*>([\s\S]*?)<\/form>/g)].find((f) => (typeof pick === "string" ? f[1]!.includes(` name="${pick}"`) : pick(f[1]!)));
  if (!form) throw new Error(`no form ${typeof pick === "string" ? `with a field "${pick}"` : "that matches"} on ${path}: ${pageText(html).slice(0, 300)}`);
  const inner = form[1]!;
  return {
    async submit(fields: Record<string, string>): Promise<Submitted> {
      const body = new FormData();
      for (const m of inner.matchAll(/<input\b[^>]*>/g)) {
        const tag = m[0];
        const name = attr(tag, "name");
        const type = attr(tag, "type") ?? "text";
        if (!name || name in fields) continue;
        if ((type === "radio" || type === "checkbox") && !/\schecked(=""|\s|>|\/)/.test(tag)) continue;
        body.append(name, attr(tag, "value") ?? "");
      }
      for (const m of inner.matchAll(/<select\b[^>]*>([\s\S]*?)<\/select>/g)) {
        const name = attr(m[0], "name");
        if (!name || name in fields) continue;
        const options = [...m[1]!.matchAll(/<option\b[^>]*>/g)].map((o) => o[0]);
        const chosen = options.find((o) => /\sselected/.test(o)) ?? options[0];
        body.append(name, chosen ? (attr(chosen, "value") ?? "") : "");
      }
      for (const [k, v] of Object.entries(fields)) body.append(k, v);
      // A browser sends its origin with a form post; Next.js checks it against the host for actions.
      const res = await session.fetch(path, { method: "POST", body, headers: { origin: appUrl() } });
      const out = await res.text();
      return { status: res.status, location: res.headers.get("location"), html: out, text: pageText(out) };
    },
  };
}

/** Loads `path` and submits its form that has a field named `pick` (default: the first of `fields`). */
export async function submitForm(session: Session, path: string, fields: Record<string, string>, pick: Pick = Object.keys(fields)[0]!): Promise<Submitted> {
  return (await loadForm(session, path, pick)).submit(fields);
}
