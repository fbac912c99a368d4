import type { Metadata } from "next";
import { SignInForm } from "@/components/auth/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string }> }) {
  const { next } = await searchParams;
  // Only same-site paths are followed after sign-in.
  const target = next && next.startsWith("/") && !next.startsWith("//") ? next : "/";
  return (
    <>
      <div className="mb-8 flex items-center gap-3">
        <img src="/icon.svg" alt="" width={48} height={48} />
        <div>
          <h1 className="text-3xl font-bold tracking-tight text-soil-900">Wormward</h1>
          <p className="text-soil-700">Your worm bins, watched while you are away.</p>
        </div>
      </div>
      <SignInForm next={target} />
      <p className="mt-8 text-sm text-soil-500">
        New to a farm? Ask its owner to invite you.
      </p>
    </>
  );
}
