import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { tokenIsCurrent } from "@/lib/auth/session-version";

// Pages need a current session (one from before a password reset is over); API routes answer 401
// themselves (with the JSON envelope), so they pass. Password reset and invitation links are for
// people who are not signed in (yet).
export async function proxy(req: NextRequest) {
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
  if (await tokenIsCurrent(token)) return NextResponse.next();
  const url = new URL("/sign-in", req.url);
  const back = req.nextUrl.pathname + req.nextUrl.search;
  if (back !== "/") url.searchParams.set("next", back);
  return NextResponse.redirect(url);
}

export const config = {
  matcher: ["/((?!api/|sign-in|forgot|reset/|join/|_next/|sw\\.js|manifest\\.webmanifest|icon\\.svg|favicon\\.ico).*)"],
};
