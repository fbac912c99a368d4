// The daily digest sender: once a day per farm, from 07:00 farm time, the previous day's digest goes
// to its owners and keepers. Which day went out lives on the farm row (compare-and-set), so two
// ingest nodes or a restart never send it twice; a day with no mail delivered at all is retried.
import createDebug from "debug";
import { claimDigestDay, listFarmsForDigest, releaseDigestDay } from "@/db/queries/digest";
import { listCrew } from "@/db/queries/push";
import { addDays, buildDigest, localClock } from "@/lib/server/alerts/digest";
import { appMailer } from "@/lib/server/mail/app-mailer";
import type { Mailer } from "@/lib/server/mail/mail";

const log = createDebug("wormward:digest");
export const DIGEST_AT_MINUTES = 7 * 60;

export type DigestOptions = { farmIds?: string[]; mailer?: Mailer | null; atMinutes?: number };
export type DigestRun = { farmId: string; day: string; sent: number; failed: number };

/** Sends every digest due at `now`; returns what this caller sent (nothing for days already taken). */
export async function sendDueDigests(now: Date, opts: DigestOptions = {}): Promise<DigestRun[]> {
  const mailer = opts.mailer === undefined ? appMailer() : opts.mailer;
  if (!mailer) return [];
  const runs: DigestRun[] = [];
  for (const farm of await listFarmsForDigest(opts.farmIds)) {
    let today: string;
    try {
      const clock = localClock(now, farm.timezone);
      if (clock.minutes < (opts.atMinutes ?? DIGEST_AT_MINUTES)) continue;
      today = clock.date;
    } catch (e) {
      log("farm %s has a timezone Intl does not know (%s): %s", farm.id, farm.timezone, (e as Error).message);
      continue;
    }
    if (farm.digestSentOn && farm.digestSentOn >= today) continue;
    if (!(await claimDigestDay(farm.id, today))) continue;
    const day = addDays(today, -1);
    try {
      const [digest, crew] = await Promise.all([buildDigest(farm.id, day), listCrew(farm.id)]);
      if (!digest || digest.binCount === 0 || crew.length === 0) {
        runs.push({ farmId: farm.id, day, sent: 0, failed: 0 });
        continue;
      }
      // One mail per person: nobody sees the others' addresses.
      const results = await Promise.allSettled(crew.map((p) => mailer.send({ to: p.email, subject: digest.subject, text: digest.text, html: digest.html })));
      const sent = results.filter((r) => r.status === "fulfilled").length;
      for (const r of results) if (r.status === "rejected") log("digest mail for farm %s failed: %s", farm.id, (r.reason as Error).message);
      if (sent === 0) await releaseDigestDay(farm.id, today, farm.digestSentOn);
      log("digest of %s for farm %s: %d sent, %d failed", day, farm.id, sent, results.length - sent);
      runs.push({ farmId: farm.id, day, sent, failed: results.length - sent });
    } catch (e) {
      log("digest of %s for farm %s not sent: %s", day, farm.id, (e as Error).message);
      await releaseDigestDay(farm.id, today, farm.digestSentOn);
    }
  }
  return runs;
}

export type DigestScheduler = { tick: () => Promise<DigestRun[]>; stop: () => Promise<void> };

/** Checks every `everyMs` (a minute by default) whether a farm's digest is due. */
export function createDigestScheduler(opts: DigestOptions & { everyMs?: number; now?: () => Date } = {}): DigestScheduler {
  const now = opts.now ?? (() => new Date());
  let running: Promise<unknown> = Promise.resolve();
  const tick = () => {
    const run = running.then(() => sendDueDigests(now(), opts));
    running = run.catch((e: Error) => log("digest tick failed: %s", e.message));
    return run;
  };
  const timer = setInterval(() => void tick().catch(() => {}), opts.everyMs ?? 60_000);
  timer.unref();
  return {
    tick,
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
