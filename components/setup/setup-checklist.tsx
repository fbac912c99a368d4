import Link from "next/link";
import { Mark } from "@/components/ui/marks";
import { SetupWatch } from "./setup-watch";

type Step = "bin" | "probe" | "reading" | "alerts" | "crew";
/** What the server's readSetupChecklist answers (plain values only). */
export type SetupChecklistView = { steps: { step: Step; done: boolean }[]; farmReady: boolean; newestProbeId: number | null };

// Each step in plain words: what to do, and where it is done.
const STEP_WORDS: Record<Step, { title: string; how: string; href: (farmId: string, probeId: number | null) => string }> = {
  bin: {
    title: "Add a bin",
    how: "Its style, its worms, and its zones from the feeding side to the harvest side.",
    href: (f) => `/farms/${f}/bins/new`,
  },
  probe: {
    title: "Register a probe",
    how: "Give it a code and the zone it sits in; its token is shown once.",
    href: (f) => `/farms/${f}/probes`,
  },
  reading: {
    title: "See its first reading",
    how: "Power the probe up and let it send; the reading shows on its page and here.",
    href: (f, p) => (p == null ? `/farms/${f}/probes` : `/farms/${f}/probes/${p}`),
  },
  alerts: {
    title: "Turn on alerts on this phone",
    how: "A bin too hot, too dry or too wet reaches you here, even with the app closed.",
    href: () => "/me",
  },
  crew: {
    title: "Invite the crew",
    how: "Keepers log work and answer alerts; viewers only read.",
    href: (f) => `/farms/${f}/team`,
  },
};

/** The setup checklist on Today (inside Today's SWRConfig, for its watcher): each step ticked from the farm's own data, each a link to where it
 * is done. Owners see every step; keepers their own; anyone else a note while the farm is set up. */
export function SetupChecklist({ farmId, checklist }: { farmId: string; checklist: SetupChecklistView }) {
  const { steps, farmReady, newestProbeId } = checklist;
  const left = steps.filter((s) => !s.done).length;
  const done = (step: Step) => steps.find((s) => s.step === step)?.done ?? farmReady;
  return (
    <section aria-labelledby="setup-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <SetupWatch farmId={farmId} binDone={done("bin")} readingDone={done("reading")} />
      <h2 id="setup-h" className="text-xl font-bold">
        Setting up this farm
      </h2>
      {steps.length > 0 && (
        <p className="text-sm text-soil-700">
          {left === 0 ? "All done." : `${steps.length - left} of ${steps.length} done. This list goes away when all are done.`}
        </p>
      )}
      {steps.length > 0 && (
        <ol className="mt-2">
          {steps.map(({ step, done }, i) => {
            const w = STEP_WORDS[step];
            return (
              <li key={step} data-step={step} data-done={done} className="flex gap-3 border-t border-soil-100 py-2 first:border-t-0">
                <span
                  className={`mt-2.5 flex h-7 w-7 shrink-0 items-center justify-center rounded-full font-bold ${done ? "bg-leaf-100 text-leaf-700" : "bg-soil-100 text-soil-800"}`}
                >
                  {done ? <Mark name="done" size={14} /> : i + 1}
                </span>
                <div className="min-w-0">
                  <Link href={w.href(farmId, newestProbeId)} className="inline-flex min-h-11 items-center font-bold underline underline-offset-4">
                    {w.title}
                  </Link>
                  <span className={`ml-2 text-sm font-bold ${done ? "text-leaf-700" : "text-soil-700"}`}>{done ? "done" : "to do"}</span>
                  <p className="text-sm text-soil-700">{w.how}</p>
                </div>
              </li>
            );
          })}
        </ol>
      )}
      {!farmReady && !steps.some((s) => s.step === "bin") && (
        <p className="mt-2 text-soil-700">An owner of this farm is still setting it up: bins, probes and their first readings show here as they come.</p>
      )}
    </section>
  );
}
