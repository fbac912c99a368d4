import { farmOfTarget, getRole, type Target } from "@/db/queries/access";
import type { Role } from "@/lib/domain/vocabulary";
import { AppError } from "@/lib/domain/errors";
import { roleAllows, type Permission } from "../../domain/roles";

export type Who = { userId: string; farmId: string; role: Role };

// The one decision for every route handler and server action: signed in? member of the farm the
// target belongs to? role allows it? Another farm's ids answer 404 so they reveal nothing.
export async function authorize(userId: string | null, target: Target, may: Permission): Promise<Who> {
  if (!userId) throw new AppError("unauthenticated", "Sign in first.");
  const farmId = await farmOfTarget(target);
  const role = farmId ? await getRole(userId, farmId) : null;
  if (!farmId || !role) throw new AppError("not_found", "Not found.");
  if (!roleAllows(role, may)) {
    throw new AppError("forbidden", `A ${role} cannot do this; ask an owner of the farm.`);
  }
  return { userId, farmId, role };
}
