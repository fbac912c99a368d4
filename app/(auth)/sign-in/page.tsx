import type { Metadata } from "next";
import { SignInForm } from "@/components/auth/sign-in-form";
import { env } from "@/lib/server/env";
import { safeNext } from "@/lib/domain/safe-next";

export const metadata: Metadata = { title: "Sign in" };

// Set by the join and reset actions, which send the person here when they are done.
const NOTICES: Record<string, string> = {
  joined: "Your account is ready and you are on the team. Sign in to open the farm.",
  "password-set": "Your new password is set. Sign in with it.",
  verified: "Your address is confirmed. Sign in to start your farm.",
};

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string; notice?: string }> }) {
  const { next, notice } = await searchParams;
  const target = safeNext(next, env().APP_URL);
  return (
    <>
      <div className="mb-8 flex items-center gap-3">
        <img src="/icon.svg" alt="" width={48} height={48} />
        <div>
          <h1 className="text-3xl font-bold tracking-tight text-soil-900">Wormward</h1>
          <p className="text-soil-700">Your worm bins, watched while you are away.</p>
        </div>
      </div>
      {notice && NOTICES[notice] && (
        <p role="status" className="mb-4 rounded-xl bg-leaf-100 p-3 font-bold text-leaf-700">
          {NOTICES[notice]}
        </p>
      )}
      <SignInForm next={target} />
      <a href="/forgot" className="mt-4 inline-flex min-h-11 items-center text-soil-700 underline">
        Forgot your password?
      </a>
      <p className="mt-8 text-soil-700">
        New here?{" "}
        <a href="/sign-up" className="inline-flex min-h-11 items-center font-bold underline">
          Make an account
        </a>
      </p>
      <p className="text-sm text-soil-500">Joining someone&apos;s farm? Use the link in their invitation.</p>
    </>
  );
}
