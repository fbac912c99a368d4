import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { newNonce, pagePolicy, securityHeaders, servedOverHttps } from "@/lib/web/api/security-headers";

// Pages and files that need no session: sign-in, sign-up and its mail link, password reset and invitation links are for people
// who are not signed in (yet); the service worker, manifest and icons are fetched without a page.
const OPEN = /^\/(?:sign-in|sign-up|check-mail|verify\/|forgot|reset\/|join\/|_next\/|sw\.js|manifest\.webmanifest|icon\.svg|favicon\.ico)/;

// Every page and file gets the security headers; pages get a policy with a fresh nonce, which Next
// reads from the request's Content-Security-Policy and puts on its scripts. Pages need a session
// token; whether it is still current (no password reset since) is checked once, in the page's own
// session read (lib/web/auth-options.ts jwt callback), not here as well.
export async function proxy(req: NextRequest) {
  const https = servedOverHttps(req);
  const policy = pagePolicy(newNonce(), { https, dev: process.env.NODE_ENV === "development" });
  let res: NextResponse;
  if (!OPEN.test(req.nextUrl.pathname) && !(await getToken({ req, secret: process.env.NEXTAUTH_SECRET }))) {
    const url = new URL("/sign-in", req.url);
    const back = req.nextUrl.pathname + req.nextUrl.search;
    if (back !== "/") url.searchParams.set("next", back);
    res = NextResponse.redirect(url);
  } else {
    const forward = new Headers(req.headers);
    forward.set("Content-Security-Policy", policy);
    res = NextResponse.next({ request: { headers: forward } });
  }
  for (const [k, v] of securityHeaders(policy, https)) res.headers.set(k, v);
  return res;
}

// API routes set theirs in next.config.ts: running the proxy on them would make Next buffer every
// request body (up to 10 MB) before the route's own capped reader sees it.
export const config = {
  matcher: ["/((?!api/).*)"],
};
