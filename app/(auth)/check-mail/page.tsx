import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { OneButtonForm } from "@/components/auth/one-button-form";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { emailOf, isVerified, SIGN_UP_ANSWER } from "@/lib/server/auth/sign-up";
import { currentUserId } from "@/lib/web/session";
import { resendLink } from "./actions";

export const metadata: Metadata = { title: "Check your mail" };

// After a sign-up (signed out), and the one screen an account with an unconfirmed address reaches
// when it signs in (app/(farm)/layout.tsx sends it here).
export default async function CheckMailPage() {
  const userId = await currentUserId();
  if (userId && (await isVerified(userId))) redirect("/");
  const email = userId ? await emailOf(userId) : null;
  return (
    <>
      <h1 className="mb-4 text-3xl font-bold tracking-tight text-soil-900">Check your mail</h1>
      {email ? (
        <div className="space-y-4">
          <p className="break-words text-soil-800">
            Confirm <strong>{email}</strong> before using Wormward: open the link we sent there. It works once, for 24 hours.
          </p>
          <p className="text-soil-700">No mail? Look in the spam folder, or send the link again.</p>
          <OneButtonForm action={resendLink} label="Send the link again" busy="Sending…" />
          <SignOutButton />
        </div>
      ) : (
        <div className="space-y-4">
          <p role="status" className="text-soil-800">
            {SIGN_UP_ANSWER}
          </p>
          <p className="text-soil-700">Once your address is confirmed, sign in.</p>
          <a href="/sign-in" className="flex h-14 items-center justify-center rounded-xl bg-soil-800 text-lg font-bold text-white">
            Sign in
          </a>
        </div>
      )}
    </>
  );
}
