import type { Metadata } from "next";
import { ForgotForm } from "@/components/auth/forgot-form";
import { askForReset } from "./actions";

export const metadata: Metadata = { title: "Forgot your password?" };

export default function ForgotPage() {
  return (
    <>
      <div className="mb-6 flex items-center gap-3">
        <img src="/icon.svg" alt="" width={48} height={48} />
        <div>
          <p className="text-soil-700">Wormward</p>
          <h1 className="text-3xl font-bold tracking-tight text-soil-900">Forgot your password?</h1>
        </div>
      </div>
      <p className="mb-6 text-soil-800">Give the e-mail you sign in with. We send a link to set a new password; it works once, for one hour.</p>
      <ForgotForm action={askForReset} />
      <a href="/sign-in" className="mt-6 inline-flex min-h-11 items-center text-soil-700 underline">
        Back to sign in
      </a>
    </>
  );
}
