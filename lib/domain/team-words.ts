// Role words for screens and mails; no zod here, so client components stay light.
import { ROLES, type Role } from "./vocabulary";

export { ROLES };
export type TeamRole = Role;

export const ROLE_WORDS: Record<TeamRole, { name: string; does: string }> = {
  owner: { name: "Owner", does: "manages bins, probes, rules and the team" },
  keeper: { name: "Keeper", does: "logs feedings and work, claims and settles alerts" },
  viewer: { name: "Viewer", does: "reads charts and the logbook, changes nothing" },
};
