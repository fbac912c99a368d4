import { listMyFarms } from "@/db/queries/users";

/** The farms a person is on, with their role on each, by name. */
export async function listFarmsOf(userId: string) {
  return listMyFarms(userId);
}
