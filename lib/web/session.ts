import createDebug from "debug";
import { getServerSession } from "next-auth";
import { notFound } from "next/navigation";
import { cache } from "react";
import { farmOfTarget, getMembership, type Target } from "@/db/queries/access";
import { AppError } from "@/lib/domain/errors";
import { authorize, type Who } from "../server/auth/authorize";
import { authOptions } from "./auth-options";
import { roleAllows, type Permission } from "../domain/roles";

const log = createDebug("wormward:page-access");

// React's cache() lasts one server render: the shell, the farm layout and the page share one
// session lookup (which checks the session version in the database) and one role lookup. Outside a
// render (route handlers, server actions) it calls straight through, so those read fresh each time.
export const currentUserId = cache(async (): Promise<string | null> => {
  const session = await getServerSession(authOptions);
  const id = (session?.user as { id?: string } | undefined)?.id;
  log("session read: %s", id ?? "(signed out)");
  return id ?? null;
});

export async function requireUser(): Promise<string> {
  const id = await currentUserId();
  if (!id) throw new AppError("unauthenticated", "Sign in first.");
  return id;
}

export async function requireMember(target: Target, may: Permission): Promise<Who> {
  return authorize(await currentUserId(), target, may);
}

// cache() compares arguments by identity, so the lookups take plain strings and numbers.
const memberOnce = cache((userId: string, farmId: string) => {
  log("role read: %s on %s", userId, farmId);
  return getMembership(userId, farmId);
});
const farmOfBinOnce = cache((binId: string) => farmOfTarget({ binId }));
const farmOfZoneOnce = cache((zoneId: string) => farmOfTarget({ zoneId }));
const farmOfProbeOnce = cache((probeId: number) => farmOfTarget({ probeId }));

// What a page under /farms/[farmId] names: the farm of its URL and, for a bin, zone or probe page,
// the thing it shows, which must belong to that farm.
export type PageTarget = { farmId: string } & (Record<never, never> | { binId: string } | { zoneId: string } | { probeId: number });

function farmOfPageThing(t: PageTarget): Promise<string | null> | string {
  if ("binId" in t) return farmOfBinOnce(t.binId);
  if ("zoneId" in t) return farmOfZoneOnce(t.zoneId);
  if ("probeId" in t) return farmOfProbeOnce(t.probeId);
  return t.farmId;
}

// For pages and layouts: a refusal of any kind shows the not-found page, so another farm's ids
// reveal nothing, and a signed-out person never gets this far (proxy.ts sends them to sign in).
export async function requirePageMember(target: PageTarget, may: Permission): Promise<Who> {
  const userId = await currentUserId();
  const [farmOfUrl, farmOfThing] = await Promise.all([farmOfTarget({ farmId: target.farmId }), farmOfPageThing(target)]);
  if (!userId || !farmOfUrl || farmOfThing !== farmOfUrl) notFound();
  const member = await memberOnce(userId, farmOfUrl);
  if (!member || !roleAllows(member.role, may)) notFound();
  return { userId, farmId: farmOfUrl, role: member.role, units: member.units };
}

/** A page-shaped read done once per request for the same person and thing, however many of the
 * tab's title (generateMetadata) and the page ask. React's cache compares arguments by identity,
 * and requirePageMember hands each caller a new Who, so the person is passed as its parts. */
export function oncePerRequest<T, I extends string | number>(read: (who: Who, id: I) => Promise<T>) {
  const once = cache((userId: string, farmId: string, role: Who["role"], units: Who["units"], id: I) => read({ userId, farmId, role, units }, id));
  return (who: Who, id: I) => once(who.userId, who.farmId, who.role, who.units, id);
}
