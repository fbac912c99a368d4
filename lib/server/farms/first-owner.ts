// The first person of a database that has no demo (one named by DATABASE_URL): an account and a
// farm they own, from the command line (lib/stack/add-owner.ts). Everyone else joins by invitation.
import { z } from "zod";
import { createFarm } from "@/db/queries/farms";
import { insertUser } from "@/db/queries/users";
import { hashPassword } from "@/lib/server/auth/password";
import { AppError } from "@/lib/domain/errors";
import { farmCreate } from "@/lib/domain/validation/farm";
import { email, newPassword, personName } from "@/lib/domain/validation/team";

export const firstOwner = z.object({ email, name: personName, password: newPassword, farm: farmCreate.shape.name });

export async function addFirstOwner(raw: unknown) {
  const input = firstOwner.parse(raw);
  const user = await insertUser({ email: input.email, name: input.name, passwordHash: await hashPassword(input.password) });
  if (!user) throw new AppError("conflict", `${input.email} already has an account.`, "email");
  const farm = await createFarm(user.id, { name: input.farm, unitSystem: "metric", timezone: "UTC" });
  return { userId: user.id, email: user.email, farmId: farm.id, farmName: farm.name };
}
