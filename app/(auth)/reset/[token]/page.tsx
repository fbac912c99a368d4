import type { Metadata } from "next";
import { DeadLink } from "@/components/auth/dead-link";
import { ResetForm } from "@/components/auth/reset-form";
import { lookupReset, RESET_REFUSALS } from "@/lib/server/auth/password-reset";
import { setNewPassword } from "./actions";

// The token is in the address: keep it out of Referer headers and search engines.
export const metadata: Metadata = { title: "Set a new password", referrer: "no-referrer", robots: { index: false } };

const TITLES = { unknown: "This link does not work", used: "Already used", expired: "This link has expired" } as const;

export default async function ResetPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const found = await lookupReset(token);
  if (found.state !== "open") {
    return <DeadLink title={TITLES[found.state]} message={RESET_REFUSALS[found.state]} next={{ href: "/forgot", label: "Ask for a new link" }} />;
  }
  return (
    <>
      <h1 className="mb-2 text-3xl font-bold tracking-tight text-soil-900">Set a new password</h1>
      <p className="mb-6 break-all text-soil-800">For {found.email}</p>
      <ResetForm token={token} email={found.email} action={setNewPassword} />
    </>
  );
}
