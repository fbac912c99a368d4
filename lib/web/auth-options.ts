// next-auth configuration. Deliberately in lib/ beside the authorization helper it feeds, though
// it imports next-auth: route handlers, server actions and proxy.ts share this one definition.
import createDebug from "debug";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { env } from "@/lib/server/env";
import { clientAddress } from "../server/auth/client-address";
import { tokenIsCurrent } from "../server/auth/session-version";
import { SignInRefused, signInWithPassword, type SignedInUser } from "../server/auth/sign-in";

const log = createDebug("wormward:sign-in");

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 30 * 24 * 3600 },
  pages: { signIn: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "E-mail and password",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(raw, req) {
        const forwarded = req.headers?.["x-forwarded-for"] as string | undefined;
        try {
          return await signInWithPassword(raw, clientAddress(forwarded, env().TRUSTED_PROXY_HOPS));
        } catch (e) {
          if (e instanceof SignInRefused) throw e;
          // next-auth would show the message of any error to the person: never an internal one.
          log("sign-in failed on our side: %s", (e as Error).message);
          throw new Error("Signing in does not work right now. Try again in a minute.");
        }
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = user.id;
        token.sv = (user as Partial<SignedInUser>).sessionVersion ?? 0;
        return token;
      }
      // Signed in before a password reset: the token no longer names anyone.
      return (await tokenIsCurrent(token)) ? token : {};
    },
    session({ session, token }) {
      if (typeof token.uid !== "string") return { expires: session.expires };
      if (session.user) (session.user as { id?: string }).id = token.uid;
      return session;
    },
  },
};
