import { farmOfTarget, getMembership, type Target } from "@/db/queries/access";
import type { Role, UnitSystem } from "@/lib/domain/vocabulary";
import { AppError } from "@/lib/domain/errors";
import { roleAllows, type Permission } from "../../domain/roles";

/** Who is acting, on which farm, in which role; `units` is the farm's unit system, so an input is
 * refused in the units the person typed it in. */
export type Who = { userId: string; farmId: string; role: Role; units: UnitSystem };

// The one decision for every route handler and server action: signed in? member of the farm the
// target belongs to? role allows it? Another farm's ids answer 404 so they reveal nothing.
export async function authorize(userId: string | null, target: Target, may: Permission): Promise<Who> {
  if (!userId) throw new AppError("unauthenticated", "Sign in first.");
  const farmId = await farmOfTarget(target);
  const member = farmId ? await getMembership(userId, farmId) : null;
  if (!farmId || !member) throw new AppError("not_found", "Not found.");
  if (!roleAllows(member.role, may)) {
    throw new AppError("forbidden", `A ${member.role} cannot do this; ask an owner of the farm.`);
  }
  return { userId, farmId, role: member.role, units: member.units };
}
