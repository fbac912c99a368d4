import { and, asc, eq, gt, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { db } from "@/db";
import { farms, invitations, memberships, users, type Membership, type Role } from "@/db/schema";

export async function listTeam(farmId: string) {
  return (
    db()
      .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.farmId, farmId))
      // Owners first, then keepers, then viewers (the enum's order), each by name.
      .orderBy(asc(memberships.role), asc(users.name))
  );
}

const inviter = alias(users, "inviter");

export async function listPendingInvitations(farmId: string, now = new Date()) {
  return db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
      invitedByName: inviter.name,
    })
    .from(invitations)
    .leftJoin(inviter, eq(inviter.id, invitations.invitedBy))
    .where(and(eq(invitations.farmId, farmId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now)))
    .orderBy(asc(invitations.createdAt));
}

export async function isMemberByEmail(farmId: string, email: string) {
  const r = await db()
    .select({ userId: memberships.userId })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.farmId, farmId), sql`lower(${users.email}) = lower(${email})`))
    .limit(1);
  return r.length > 0;
}

// A new invitation replaces any open one for the same address, so only the latest link works.
export async function createInvitation(input: { farmId: string; email: string; role: Role; tokenHash: string; invitedBy: string; expiresAt: Date }) {
  return db().transaction(async (tx) => {
    await tx
      .delete(invitations)
      .where(and(eq(invitations.farmId, input.farmId), sql`lower(${invitations.email}) = lower(${input.email})`, isNull(invitations.acceptedAt)));
    const [row] = await tx.insert(invitations).values(input).returning();
    return row!;
  });
}

export async function deleteInvitation(farmId: string, invitationId: string) {
  const rows = await db()
    .delete(invitations)
    .where(and(eq(invitations.farmId, farmId), eq(invitations.id, invitationId), isNull(invitations.acceptedAt)))
    .returning({ id: invitations.id });
  return rows.length > 0;
}

export async function getInvitationByTokenHash(tokenHash: string) {
  const [r] = await db()
    .select({ invitation: invitations, farmName: farms.name, invitedByName: inviter.name })
    .from(invitations)
    .innerJoin(farms, eq(farms.id, invitations.farmId))
    .leftJoin(inviter, eq(inviter.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, tokenHash));
  return r ?? null;
}

type Joiner = { userId: string } | { newUser: { email: string; name: string; passwordHash: string; timezone: string } };
type Joined = { farmId: string; userId: string; role: Role };

// Thrown inside the transaction only to roll back the taken invitation.
class EmailTaken extends Error {}

/**
 * Takes the invitation (compare-and-set on accepted_at, so a link works once even when tapped twice)
 * and adds the membership in the same transaction. `gone` when the link is used, expired or unknown;
 * `email_taken` when a new account's address was signed up meanwhile (nothing is kept then).
 */
export async function acceptInvitation(tokenHash: string, joiner: Joiner, now = new Date()): Promise<{ joined: Joined } | { refused: "gone" | "email_taken" }> {
  try {
    return await db().transaction(async (tx) => {
      const [inv] = await tx
        .update(invitations)
        .set({ acceptedAt: now })
        .where(and(eq(invitations.tokenHash, tokenHash), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now)))
        .returning();
      if (!inv) return { refused: "gone" as const };
      let userId: string;
      if ("userId" in joiner) userId = joiner.userId;
      else {
        const [u] = await tx.insert(users).values(joiner.newUser).onConflictDoNothing().returning({ id: users.id });
        if (!u) throw new EmailTaken();
        userId = u.id;
      }
      // Someone already on the team keeps the role they have.
      await tx.insert(memberships).values({ userId, farmId: inv.farmId, role: inv.role }).onConflictDoNothing();
      const [m] = await tx
        .select({ role: memberships.role })
        .from(memberships)
        .where(and(eq(memberships.userId, userId), eq(memberships.farmId, inv.farmId)));
      return { joined: { farmId: inv.farmId, userId, role: m!.role } };
    });
  } catch (e) {
    if (e instanceof EmailTaken) return { refused: "email_taken" };
    throw e;
  }
}

export type MembershipChange = { changed: Membership | null } | { refused: "not_member" | "last_owner" };

// Role changes and removals lock the farm's owner rows first, so two owners demoting each other at
// the same moment cannot leave the farm with none: the guard must run under that lock, so it is here.
async function changeMembership(farmId: string, userId: string, next: Role | null): Promise<MembershipChange> {
  return db().transaction(async (tx) => {
    const owners = await tx
      .select({ userId: memberships.userId })
      .from(memberships)
      .where(and(eq(memberships.farmId, farmId), eq(memberships.role, "owner")))
      .for("update");
    const [cur] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.farmId, farmId), eq(memberships.userId, userId)));
    if (!cur) return { refused: "not_member" as const };
    if (cur.role === "owner" && next !== "owner" && owners.length <= 1) return { refused: "last_owner" as const };
    const where = and(eq(memberships.farmId, farmId), eq(memberships.userId, userId));
    if (next === null) {
      await tx.delete(memberships).where(where);
      return { changed: null };
    }
    const [row] = await tx.update(memberships).set({ role: next }).where(where).returning();
    return { changed: row! };
  });
}

/** The member's new row, or why not: not on the team, or the farm's last owner. */
export const updateMemberRole = (farmId: string, userId: string, role: Role) => changeMembership(farmId, userId, role);
/** `changed: null` once removed, or why not: not on the team, or the farm's last owner. */
export const deleteMember = (farmId: string, userId: string) => changeMembership(farmId, userId, null);
