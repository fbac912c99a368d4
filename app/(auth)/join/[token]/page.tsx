import type { Metadata } from "next";
import { DeadLink } from "@/components/auth/dead-link";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { JoinAsMeForm, JoinForm } from "@/components/team/join-form";
import { currentUserId } from "@/lib/web/session";
import { INVITATION_REFUSALS } from "@/lib/server/team/invitation-link";
import { joinView } from "@/lib/server/team/join-view";
import { ROLE_WORDS } from "@/lib/domain/team-words";
import { joinMe, joinNew } from "./actions";

// The token is in the address: keep it out of Referer headers and search engines.
export const metadata: Metadata = { title: "Join a farm", referrer: "no-referrer", robots: { index: false } };

const TITLES = { unknown: "This link does not work", used: "Already used", expired: "This invitation has expired" } as const;

export default async function JoinPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const inv = await joinView(token, await currentUserId());
  if (inv.state !== "open") {
    return <DeadLink title={TITLES[inv.state]} message={INVITATION_REFUSALS[inv.state]} next={{ href: "/sign-in", label: "Go to sign in" }} />;
  }
  const myEmail = inv.signedInAs;
  const role = ROLE_WORDS[inv.role];
  return (
    <>
      <div className="mb-6 flex items-center gap-3">
        <img src="/icon.svg" alt="" width={48} height={48} />
        <div>
          <p className="text-soil-700">Wormward</p>
          <h1 className="text-3xl font-bold tracking-tight text-soil-900">Join {inv.farmName}</h1>
        </div>
      </div>
      <p className="mb-6 text-soil-800">
        {inv.invitedByName ?? "An owner"} invited <strong className="break-all">{inv.email}</strong> as {inv.role === "owner" ? "an" : "a"}{" "}
        <strong>{role.name.toLowerCase()}</strong> ({role.does}).
      </p>
      {myEmail && myEmail.toLowerCase() === inv.email.toLowerCase() ? (
        <JoinAsMeForm token={token} farmName={inv.farmName} action={joinMe} />
      ) : myEmail ? (
        <div role="alert" className="space-y-3 rounded-2xl bg-white p-5 ring-1 ring-soil-300">
          <p>
            You are signed in as <strong className="break-all">{myEmail}</strong>, but this invitation is for <strong className="break-all">{inv.email}</strong>
            . Sign out, then open the link again.
          </p>
          <div className="rounded-xl bg-soil-800">
            <SignOutButton />
          </div>
        </div>
      ) : inv.hasAccount ? (
        <div className="space-y-3 rounded-2xl bg-white p-5 ring-1 ring-soil-300">
          <p>{inv.email} already has a Wormward account. Sign in, and you come back here to join.</p>
          <a
            href={`/sign-in?next=${encodeURIComponent(`/join/${token}`)}`}
            className="flex h-14 items-center justify-center rounded-xl bg-leaf-700 text-lg font-bold text-white"
          >
            Sign in to join
          </a>
        </div>
      ) : (
        <JoinForm token={token} email={inv.email} action={joinNew} />
      )}
    </>
  );
}
