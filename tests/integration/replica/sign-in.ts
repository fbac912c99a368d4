// Signs in to an app at `base` (not the harness's) through next-auth's credentials flow, as a browser does.
export type AppSession = { fetch: (path: string, init?: RequestInit & { json?: unknown }) => Promise<Response> };

export async function signInAt(base: string, email: string, password: string): Promise<AppSession> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const pair = c.split(";")[0]!;
      const i = pair.indexOf("=");
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes("session-token"))) throw new Error(`sign-in failed for ${email} (${res.status})`);
  return {
    fetch: (p, init = {}) => {
      const { json, ...rest } = init;
      const headers = new Headers(rest.headers);
      headers.set("cookie", cookie());
      if (json !== undefined) headers.set("content-type", "application/json");
      const send = () => fetch(`${base}${p}`, { ...rest, headers, redirect: "manual", body: json !== undefined ? JSON.stringify(json) : rest.body });
      // A kept-alive socket the server closed as it was reused ("other side closed") is the client's
      // race, not the app's answer: a GET is sent once more. An app that is down refuses it again.
      return (rest.method ?? "GET") === "GET"
        ? send().catch((err: Error) => (/other side closed/.test(String(err.cause)) ? send() : Promise.reject(err)))
        : send();
    },
  };
}
