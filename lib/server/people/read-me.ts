import { getUser, listMyFarms } from "@/db/queries/users";
import { AppError } from "@/lib/domain/errors";

/** Who is signed in: name, e-mail, quiet hours, time zone and the farms they are on. */
export async function readMe(userId: string) {
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  const { id, name, email, quietFrom, quietTo, timezone } = user;
  return { id, name, email, quietFrom, quietTo, timezone, farms: await listMyFarms(userId) };
}
