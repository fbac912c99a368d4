"use client";

import { useActionState, useState } from "react";
import type { FormAction } from "@/components/ui/form-parts";
import { Panel } from "@/components/ui/panel";

type Bin = { id: string; name: string; detail: string };

const BinName = ({ bin }: { bin: Bin }) => (
  <span>
    <span className="block text-lg font-bold">{bin.name}</span>
    <span className="block text-sm text-soil-700">{bin.detail}</span>
  </span>
);

const Refusal = ({ error }: { error?: string }) =>
  error ? (
    <p aria-live="polite" className="text-sm font-bold text-clay-700">
      {error}
    </p>
  ) : null;

// Archiving asks once more: the bin leaves Today (its readings and logbook stay).
function LiveBin({ farmId, bin, action }: { farmId: string; bin: Bin; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const [asking, setAsking] = useState(false);
  return (
    <li className="py-3">
      <div className="flex items-center justify-between gap-2">
        <BinName bin={bin} />
        {!asking && (
          <button
            type="button"
            onClick={() => setAsking(true)}
            aria-label={`Archive ${bin.name}`}
            className="min-h-12 shrink-0 rounded-xl bg-white px-4 font-bold ring-1 ring-soil-500"
          >
            Archive
          </button>
        )}
      </div>
      {asking && (
        <form action={formAction} className="mt-2 space-y-2 rounded-xl bg-straw-100 p-3 ring-1 ring-straw-600">
          <p>Archive {bin.name}? It leaves Today; its readings and logbook stay, and you can bring it back here.</p>
          <input type="hidden" name="farmId" value={farmId} />
          <input type="hidden" name="binId" value={bin.id} />
          <div className="grid grid-cols-2 gap-2">
            <button disabled={pending} className="min-h-12 rounded-xl bg-clay-700 px-3 font-bold text-white disabled:opacity-60">
              {pending ? "Archiving…" : "Yes, archive"}
            </button>
            <button type="button" onClick={() => setAsking(false)} className="min-h-12 rounded-xl bg-white px-3 font-bold ring-1 ring-soil-500">
              Keep it
            </button>
          </div>
        </form>
      )}
      <Refusal error={state.error} />
    </li>
  );
}

function ArchivedBin({ farmId, bin, action }: { farmId: string; bin: Bin; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <li className="py-3">
      <form action={formAction} className="flex items-center justify-between gap-2">
        <input type="hidden" name="farmId" value={farmId} />
        <input type="hidden" name="binId" value={bin.id} />
        <BinName bin={bin} />
        <button
          disabled={pending}
          aria-label={`Bring back ${bin.name}`}
          className="min-h-12 shrink-0 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60"
        >
          {pending ? "…" : "Bring back"}
        </button>
      </form>
      <Refusal error={state.error} />
    </li>
  );
}

export function BinArchive({
  farmId,
  live,
  archived,
  archive,
  bringBack,
}: {
  farmId: string;
  live: Bin[];
  archived: Bin[];
  archive: FormAction;
  bringBack: FormAction;
}) {
  return (
    <>
      <Panel id="live-bins-h" title="Bins">
        {live.length === 0 ? (
          <p className="mt-2">No bins in use.</p>
        ) : (
          <ul className="divide-y divide-soil-100">
            {live.map((b) => (
              <LiveBin key={b.id} farmId={farmId} bin={b} action={archive} />
            ))}
          </ul>
        )}
      </Panel>
      <Panel id="archived-bins-h" title="Archived bins">
        {archived.length === 0 ? (
          <p className="mt-2 text-soil-700">None archived.</p>
        ) : (
          <ul className="divide-y divide-soil-100">
            {archived.map((b) => (
              <ArchivedBin key={b.id} farmId={farmId} bin={b} action={bringBack} />
            ))}
          </ul>
        )}
      </Panel>
    </>
  );
}
