import type { TeamRole as Role } from "@/lib/domain/team-words";
import { ROLE_WORDS } from "@/lib/domain/team-words";

// A role reads as a word with its own shape, never by colour alone.
const look: Record<Role, { cls: string; shape: React.ReactNode }> = {
  owner: { cls: "bg-soil-800 text-soil-100 ring-soil-800", shape: <path d="M1 10 2 3l2.5 3L6 1l1.5 5L10 3l1 7Z" /> },
  keeper: { cls: "bg-leaf-100 text-leaf-700 ring-leaf-500", shape: <path d="M6 11.5C2 9 1 6 1.5 2 4 2 6 3.5 6 6c0-2.5 2-4 4.5-4 .5 4-.5 7-4.5 9.5Z" /> },
  viewer: {
    cls: "bg-soil-100 text-soil-700 ring-soil-300",
    shape: <path d="M6 3C3 3 1 6 1 6s2 3 5 3 5-3 5-3-2-3-5-3Zm0 1.5a1.5 1.5 0 1 1 0 3 1.5 1.5 0 0 1 0-3Z" />,
  },
};

export function RoleBadge({ role }: { role: Role }) {
  const l = look[role];
  return (
    <span className={`inline-flex shrink-0 items-center gap-1 rounded-full px-2 py-0.5 text-sm font-bold ring-1 ${l.cls}`}>
      <svg viewBox="0 0 12 12" width="12" height="12" aria-hidden="true" fill="currentColor">
        {l.shape}
      </svg>
      {ROLE_WORDS[role].name}
    </span>
  );
}
