"use client";

import { useActionState } from "react";
import type { TeamRole as Role } from "@/lib/domain/team-words";
import { RoleBadge } from "./role-badge";
import type { FormAction } from "@/components/ui/form-parts";

export type PendingInvitation = { id: string; email: string; role: Role; expires: string; invitedByName: string | null };

// One action state for the whole list: a revoked row disappears, and the word stays here.
export function PendingInvitations({ farmId, invitations, action }: { farmId: string; invitations: PendingInvitation[]; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <section aria-labelledby="pending-h">
      <h2 id="pending-h" className="mb-2 text-xl font-bold">
        Waiting to join ({invitations.length})
      </h2>
      <p aria-live="polite" className={`mb-2 text-sm empty:mb-0 ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
      {invitations.length === 0 && <p className="text-soil-500">No open invitations.</p>}
      <ul className="space-y-3">
        {invitations.map((i) => (
          <li key={i.id} className="rounded-xl bg-white p-3 ring-1 ring-soil-300">
            <div className="flex items-start justify-between gap-2">
              <p className="font-bold break-all">{i.email}</p>
              <RoleBadge role={i.role} />
            </div>
            <p className="text-sm text-soil-700">
              {i.invitedByName ? `Invited by ${i.invitedByName} · ` : ""}link works until {i.expires}
            </p>
            <form action={formAction} className="mt-2">
              <input type="hidden" name="farmId" value={farmId} />
              <input type="hidden" name="invitationId" value={i.id} />
              <button
                disabled={pending}
                aria-label={`Revoke the invitation to ${i.email}`}
                className="min-h-11 rounded-lg px-3 font-bold text-clay-700 ring-1 ring-clay-500 disabled:opacity-60"
              >
                Revoke
              </button>
            </form>
          </li>
        ))}
      </ul>
    </section>
  );
}
