import type { Metadata } from "next";
import { DeadLink } from "@/components/auth/dead-link";
import { OneButtonForm } from "@/components/auth/one-button-form";
import { lookupVerification, VERIFY_REFUSALS } from "@/lib/server/auth/sign-up";
import { confirmAddress } from "./actions";

// The token is in the address: keep it out of Referer headers and search engines.
export const metadata: Metadata = { title: "Confirm your address", referrer: "no-referrer", robots: { index: false } };

const TITLES = { unknown: "This link does not work", used: "Already used", expired: "This link has expired" } as const;

// Opening the link shows a button rather than confirming at once: mail scanners fetch links too.
export default async function VerifyPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const found = await lookupVerification(token);
  if (found.state !== "open") {
    return <DeadLink title={TITLES[found.state]} message={VERIFY_REFUSALS[found.state]} next={{ href: "/sign-in", label: "Sign in" }} />;
  }
  return (
    <>
      <h1 className="mb-2 text-3xl font-bold tracking-tight text-soil-900">Confirm your address</h1>
      <p className="mb-6 break-all text-soil-800">{found.email}</p>
      <OneButtonForm action={confirmAddress} label="Confirm my address" busy="Confirming…" hidden={{ token }} />
    </>
  );
}
