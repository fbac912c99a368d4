import { getSetupFacts } from "@/db/queries/setup";
import type { Who } from "@/lib/server/auth/authorize";

/** The setup steps in the order a new farm takes them. */
export const SETUP_STEPS = ["bin", "probe", "reading", "alerts", "crew"] as const;
export type SetupStep = (typeof SETUP_STEPS)[number];

// Until these are done the farm shows nothing on Today; "alerts" is each person's own (a push
// subscription of theirs) and "crew" is done for anyone who is not alone on the farm.
const FARM_STEPS = ["bin", "probe", "reading"] as const;
// What each role can do itself: keepers get alerts on their phone; viewers get no alerts at all
// (lib/server/alerts/notify.ts pushes to owners and keepers), so they have no step.
const STEPS_OF = { owner: SETUP_STEPS, keeper: ["alerts"], viewer: [] } as const satisfies Record<Who["role"], readonly SetupStep[]>;

export type SetupChecklist = {
  /** The steps this person can take, each ticked from the data. */
  steps: { step: SetupStep; done: boolean }[];
  /** False while the owner still has a bin, a probe or a first reading to go. */
  farmReady: boolean;
  /** The probe whose page shows the first reading, when there is one. */
  newestProbeId: number | null;
};

/** The setup checklist on Today, or null when there is nothing left for this person to see. */
export async function readSetupChecklist(who: Pick<Who, "farmId" | "userId" | "role">): Promise<SetupChecklist | null> {
  const facts = await getSetupFacts(who.farmId, who.userId);
  const steps = STEPS_OF[who.role].map((step) => ({ step, done: facts[step] }));
  const farmReady = FARM_STEPS.every((s) => facts[s]);
  if (farmReady && steps.every((s) => s.done)) return null;
  return { steps, farmReady, newestProbeId: facts.newestProbeId };
}
