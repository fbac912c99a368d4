"use client";

import { useState } from "react";
import { failureOf, send } from "@/lib/client/fetcher";
import { useBinRules } from "@/lib/client/hooks/use-bin-rules";
import { binRulesKey } from "@/lib/client/swr-keys";
import type { BinRules } from "@/lib/client/wire";
import type { UnitSystem } from "@/lib/domain/units";
import { RuleCard, type KindState, type RuleMessage } from "./rule-card";

// Every alert kind of one bin; owners change, save or reset one kind at a time, everyone else reads.
export function RulesTable({
  binId,
  initial,
  words,
  system,
  timezone,
  canEdit,
}: {
  binId: string;
  timezone: string;
  initial: BinRules;
  words: Record<string, string>;
  system: UnitSystem;
  canEdit: boolean;
}) {
  const { data, mutate } = useBinRules(binId, initial);
  const rules = data ?? initial;
  const [messages, setMessages] = useState<Record<string, RuleMessage>>({});
  const [busy, setBusy] = useState<string | null>(null);
  const say = (kind: string, m: RuleMessage) => setMessages((all) => ({ ...all, [kind]: m }));

  async function change(kind: string, method: "PUT" | "DELETE", body?: unknown): Promise<boolean> {
    setBusy(kind);
    try {
      const url = method === "PUT" ? binRulesKey(binId)! : `${binRulesKey(binId)}?kind=${encodeURIComponent(kind)}`;
      await send(method, url, body);
      await mutate();
      return true;
    } catch (e) {
      const err = failureOf(e);
      const key = err.field?.startsWith("thresholds.") ? err.field.slice("thresholds.".length) : null;
      say(kind, key ? { error: "Check the marked field.", fieldErrors: { [key]: err.message } } : { error: err.message });
      return false;
    } finally {
      setBusy(null);
    }
  }

  const save = async (kind: string, s: KindState) => {
    if (await change(kind, "PUT", { kind, enabled: s.enabled, thresholds: s.thresholds })) say(kind, { ok: `Saved for this bin.` });
  };
  const reset = async (kind: string) => {
    if (await change(kind, "DELETE")) say(kind, { ok: "Back to the species defaults." });
  };

  return (
    <div className="space-y-4">
      <nav aria-label="Alert kinds" className="flex flex-wrap gap-2">
        {rules.defaults.map((d) => (
          <a key={d.kind} href={`#rule-${d.kind}`} className="flex min-h-11 items-center rounded-full bg-white px-3 ring-1 ring-soil-300">
            {words[d.kind] ?? d.kind}
          </a>
        ))}
      </nav>
      {rules.defaults.map((d) => {
        const own = rules.overrides[d.kind];
        const eff = rules.effective[d.kind] ?? { enabled: true, t: {} };
        return (
          <RuleCard
            // a fresh card after each save or reset, so the inputs show what is stored
            key={`${d.kind}:${JSON.stringify(own ?? null)}`}
            binId={binId}
            timezone={timezone}
            row={d}
            word={words[d.kind] ?? d.kind}
            own={own}
            effective={eff}
            system={system}
            canEdit={canEdit}
            busy={busy === d.kind}
            message={messages[d.kind]}
            onSave={(s) => save(d.kind, s)}
            onReset={() => reset(d.kind)}
            onInvalid={(m) => say(d.kind, m)}
          />
        );
      })}
    </div>
  );
}
