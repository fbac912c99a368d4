import type { TeamRole as Role } from "@/lib/domain/team-words";
import { ROLE_WORDS } from "@/lib/domain/team-words";
import { Mark } from "@/components/ui/marks";

// A role reads as a word with its own mark (components/ui/marks.tsx), never by colour alone.
const look: Record<Role, { cls: string }> = {
  owner: { cls: "bg-soil-800 text-soil-100 ring-soil-800" },
  keeper: { cls: "bg-leaf-100 text-leaf-700 ring-leaf-500" },
  viewer: { cls: "bg-soil-100 text-soil-700 ring-soil-300" },
};

export function RoleBadge({ role }: { role: Role }) {
  const l = look[role];
  return (
    <span className={`inline-flex shrink-0 items-center gap-1 rounded-full px-2 py-0.5 text-sm font-bold ring-1 ${l.cls}`}>
      <Mark name={role} />
      {ROLE_WORDS[role].name}
    </span>
  );
}
