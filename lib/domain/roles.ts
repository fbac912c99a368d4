import type { Role } from "@/lib/domain/vocabulary";

// read: see everything of the farm; log: logbook entries, claim and settle alerts, own push
// subscriptions; manage: bins, zones, probes, rules, team and farm settings.
export type Permission = "read" | "log" | "manage";

const grants: Record<Role, readonly Permission[]> = {
  owner: ["read", "log", "manage"],
  keeper: ["read", "log"],
  viewer: ["read"],
};

export const roleAllows = (role: Role, may: Permission) => grants[role].includes(may);
