import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { InviteForm } from "@/components/team/invite-form";
import { MemberList } from "@/components/team/member-card";
import { PendingInvitations } from "@/components/team/pending-invitations";
import { requirePageMember } from "@/lib/web/session";
import { teamView } from "@/lib/server/team/team-view";
import { changeRole, invite, remove, revoke } from "./actions";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

export const metadata: Metadata = { title: "Team" };

export default async function TeamPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const view = await teamView(who);
  if (!view) notFound();
  const { farm, members: team, invitations: pending } = view;
  const owner = who.role === "owner";
  const day = (d: Date) => d.toLocaleDateString("en-GB", { timeZone: timeZoneOrUtc(farm.timezone), day: "numeric", month: "short", year: "numeric" });
  return (
    <main className="space-y-6 p-4">
      <div>
        <a href={`/farms/${farmId}`} className="inline-flex min-h-11 items-center text-sm text-soil-500">
          ← Today
        </a>
        <p className="text-sm text-soil-500">{farm.name}</p>
        <h1 className="text-3xl font-bold">Team</h1>
      </div>
      <section aria-labelledby="people-h">
        <h2 id="people-h" className="mb-2 text-xl font-bold">
          People ({team.length})
        </h2>
        <MemberList
          members={team.map((m) => ({
            userId: m.userId,
            name: m.name,
            role: m.role,
            joined: day(m.joinedAt),
            isYou: m.userId === who.userId,
            email: m.email,
          }))}
          manage={owner ? { farmId, changeRole, remove } : undefined}
        />
      </section>
      {owner ? (
        <>
          <InviteForm farmId={farmId} action={invite} />
          <PendingInvitations
            farmId={farmId}
            action={revoke}
            invitations={pending.map((i) => ({ id: i.id, email: i.email, role: i.role, invitedByName: i.invitedByName, expires: day(i.expiresAt) }))}
          />
        </>
      ) : (
        <p className="rounded-xl bg-soil-100 p-4">Only an owner of {farm.name} can invite people or change roles.</p>
      )}
    </main>
  );
}
