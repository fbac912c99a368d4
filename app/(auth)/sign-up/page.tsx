import type { Metadata } from "next";
import { SignUpForm } from "@/components/auth/sign-up-form";
import { signUpAction } from "./actions";

export const metadata: Metadata = { title: "Make an account" };

export default function SignUpPage() {
  return (
    <>
      <div className="mb-6 flex items-center gap-3">
        <img src="/icon.svg" alt="" width={48} height={48} />
        <div>
          <p className="text-soil-700">Wormward</p>
          <h1 className="text-3xl font-bold tracking-tight text-soil-900">Make an account</h1>
        </div>
      </div>
      <p className="mb-6 text-soil-800">We send a link to your e-mail to confirm it. Then you can start a farm of your own, or join one by invitation.</p>
      <SignUpForm action={signUpAction} />
      <a href="/sign-in" className="mt-6 inline-flex min-h-11 items-center text-soil-700 underline">
        I already have an account
      </a>
    </>
  );
}
