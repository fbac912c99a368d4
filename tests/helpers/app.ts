import { inject } from "vitest";

export function appUrl(): string {
  const url = inject("appUrl");
  if (!url) throw new Error("The app is not built; run `npm test`, which builds it first.");
  return url;
}

export type Session = {
  fetch: (path: string, init?: RequestInit & { json?: unknown }) => Promise<Response>;
  cookie: string;
};

function mergeCookies(jar: Map<string, string>, res: Response) {
  for (const c of res.headers.getSetCookie()) {
    const [pair] = c.split(";");
    const i = pair!.indexOf("=");
    jar.set(pair!.slice(0, i), pair!.slice(i + 1));
  }
}

const jarHeader = (jar: Map<string, string>) => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");

export type SignInAttempt = {
  status: number;
  /** next-auth's error for a refused sign-in ("CredentialsSignin", or our own words), else null. */
  error: string | null;
  /** The raw answer, to compare two refusals. */
  body: string;
  ms: number;
  session: Session | null;
};

// Signs in through next-auth's own credentials flow (CSRF token, then the callback), like a browser.
// `from` names the client address as one trusted proxy would (the harness starts the app with
// TRUSTED_PROXY_HOPS=1); without it the app sees 127.0.0.1.
export async function trySignIn(email: string, password: string, from?: string): Promise<SignInAttempt> {
  const base = appUrl();
  const jar = new Map<string, string>();
  const forwarded: Record<string, string> = from ? { "x-forwarded-for": from } : {};
  const csrfRes = await fetch(`${base}/api/auth/csrf`, { headers: forwarded });
  mergeCookies(jar, csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const started = performance.now();
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jarHeader(jar), ...forwarded },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const body = await res.text();
  const ms = performance.now() - started;
  mergeCookies(jar, res);
  let error: string | null = null;
  try {
    const url = (JSON.parse(body) as { url?: string }).url;
    error = url ? new URL(url).searchParams.get("error") : null;
  } catch {
    /* not JSON: no next-auth error */
  }
  const signedIn = [...jar.keys()].some((k) => k.includes("session-token"));
  return { status: res.status, error, body, ms, session: signedIn ? anonymous(jar) : null };
}

export async function signIn(email: string, password: string): Promise<Session> {
  const a = await trySignIn(email, password);
  if (!a.session) throw new Error(`sign-in failed for ${email} (${a.status}${a.error ? `: ${a.error}` : ""})`);
  return a.session;
}

export function anonymous(jar = new Map<string, string>()): Session {
  const base = appUrl();
  return {
    cookie: jarHeader(jar),
    fetch: (path, init = {}) => {
      const { json, ...rest } = init;
      const headers = new Headers(rest.headers);
      if (jar.size) headers.set("cookie", jarHeader(jar));
      if (json !== undefined) headers.set("content-type", "application/json");
      return fetch(`${base}${path}`, { ...rest, headers, redirect: "manual", body: json !== undefined ? JSON.stringify(json) : rest.body });
    },
  };
}

// The seeded demo farm's id in the app database (other tests give the demo people more farms).
export async function demoFarmId(): Promise<string> {
  const { default: pg } = await import("pg");
  const c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  try {
    return (await c.query(`select id from farms where name = 'Alder Row Worm Farm' order by created_at limit 1`)).rows[0].id;
  } finally {
    await c.end();
  }
}
