"use client";

import { useActionState } from "react";
import type { TeamRole as Role } from "@/lib/domain/team-words";
import { ROLE_WORDS, ROLES } from "@/lib/domain/team-words";
import type { ActionState } from "@/lib/web/validated-action";
import { RoleBadge } from "./role-badge";
import type { FormAction } from "@/components/ui/form-parts";

export type Member = { userId: string; name: string; role: Role; email?: string; joined: string; isYou: boolean };
type Manage = { farmId: string; changeRole: FormAction; remove: FormAction };
type Remove = { action: (form: FormData) => void; pending: boolean };

function Controls({ member, manage, remove }: { member: Member & { lastOwner: boolean }; manage: Manage; remove: Remove }) {
  const [roleState, roleAction, rolePending] = useActionState(manage.changeRole, {});
  if (member.lastOwner) {
    return <p className="mt-2 text-sm text-soil-700">The farm&apos;s only owner. Make someone else an owner before changing this role.</p>;
  }
  return (
    <div className="mt-3 space-y-2">
      <form action={roleAction} className="flex gap-2">
        <input type="hidden" name="farmId" value={manage.farmId} />
        <input type="hidden" name="userId" value={member.userId} />
        <label className="sr-only" htmlFor={`role-${member.userId}`}>
          Role of {member.name}
        </label>
        <select
          id={`role-${member.userId}`}
          name="role"
          defaultValue={member.role}
          className="h-12 min-w-0 flex-1 rounded-xl border border-soil-300 bg-paper px-3"
        >
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_WORDS[r].name}
            </option>
          ))}
        </select>
        <button disabled={rolePending} className="h-12 rounded-xl bg-soil-800 px-4 font-bold text-white disabled:opacity-60">
          {rolePending ? "Saving…" : "Change role"}
        </button>
      </form>
      {/* details/summary asks "are you sure" without script, so removal works on any phone. */}
      <details className="group">
        <summary className="inline-flex min-h-11 cursor-pointer list-none items-center rounded-lg px-3 font-bold text-clay-700 ring-1 ring-clay-500">
          {member.isYou ? "Leave the team…" : "Remove…"}
        </summary>
        <form action={remove.action} className="mt-2 rounded-xl bg-clay-100 p-3">
          <input type="hidden" name="farmId" value={manage.farmId} />
          <input type="hidden" name="userId" value={member.userId} />
          <p className="text-sm">
            {member.isYou ? "You will lose access to this farm." : `${member.name} will lose access to this farm. Their logbook entries stay.`}
          </p>
          <button disabled={remove.pending} className="mt-2 min-h-12 rounded-xl bg-clay-700 px-4 font-bold text-white disabled:opacity-60">
            {remove.pending ? "Removing…" : member.isYou ? "Yes, leave" : `Yes, remove ${member.name}`}
          </button>
        </form>
      </details>
      <p aria-live="polite" className={`text-sm ${roleState.error ? "text-clay-700" : "text-leaf-700"}`}>
        {roleState.error ?? roleState.ok}
      </p>
    </div>
  );
}

function MemberCard({ member, manage, remove }: { member: Member & { lastOwner: boolean }; manage?: Manage; remove: Remove }) {
  return (
    <li className="rounded-xl bg-white p-3 ring-1 ring-soil-300">
      <div className="flex items-start justify-between gap-2">
        <div className="min-w-0">
          <p className="font-bold">
            {member.name}
            {member.isYou && <span className="font-normal text-soil-500"> (you)</span>}
          </p>
          {member.email && <p className="text-sm break-all text-soil-700">{member.email}</p>}
        </div>
        <RoleBadge role={member.role} />
      </div>
      <p className="text-sm text-soil-500">
        {ROLE_WORDS[member.role].does} · on the team since {member.joined}
      </p>
      {manage && <Controls member={member} manage={manage} remove={remove} />}
    </li>
  );
}

const noAction = async (s: ActionState) => s;

// Removal's state lives on the list: the removed card disappears, and the word stays here.
export function MemberList({ members, manage }: { members: Member[]; manage?: Manage }) {
  const [state, removeAction, pending] = useActionState(manage?.remove ?? noAction, {});
  const owners = members.filter((m) => m.role === "owner").length;
  return (
    <>
      <p aria-live="polite" className={`mb-2 text-sm empty:mb-0 ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
      <ul className="space-y-3">
        {members.map((m) => (
          <MemberCard
            key={m.userId}
            member={{ ...m, lastOwner: m.role === "owner" && owners <= 1 }}
            manage={manage}
            remove={{ action: removeAction, pending }}
          />
        ))}
      </ul>
    </>
  );
}
