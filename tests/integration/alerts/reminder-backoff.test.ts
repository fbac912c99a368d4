// Reminders of an unclaimed act-now alert back off and stop (issue 11: act-now repeated every 15 min
// all night). Common practice: the first after 15 min, then 30, then 60 min later, at most three.
import { describe, expect, it } from "vitest";
import { claimAlert, takeDueReminders } from "@/db/queries/alerts";
import { addKeeper, raiseActNow } from "./helpers";
import { createProbes } from "../ingest/helpers";

const MIN = 60_000;

describe("reminders of an unclaimed act-now alert", () => {
  it("come 15, 30 and 60 min apart, three in all, and each is taken once", async () => {
    const [probe] = await createProbes(1);
    const alert = await raiseActNow(probe!, "heat", 31, "°C");
    const t0 = alert.actNowAt!.getTime();
    const mine = async (minute: number) => (await takeDueReminders(15 * MIN, new Date(t0 + minute * MIN))).filter((a) => a.id === alert.id);

    expect(await mine(14)).toHaveLength(0);
    const first = await mine(15);
    expect(first).toHaveLength(1);
    expect(first[0]!.reminderCount).toBe(1);
    // taken once: a second node asking at the same instant gets nothing
    expect(await mine(15)).toHaveLength(0);
    expect(await mine(44)).toHaveLength(0);
    expect((await mine(45))[0]?.reminderCount).toBe(2);
    expect(await mine(104)).toHaveLength(0);
    expect((await mine(105))[0]?.reminderCount).toBe(3);
    // bounded: nothing more, however long it stays unclaimed
    expect(await mine(24 * 60)).toHaveLength(0);
  });

  it("a claimed alert is not reminded", async () => {
    const [probe] = await createProbes(1);
    const keeper = await addKeeper(probe!, `claimer-${probe!.code}@example.org`);
    const alert = await raiseActNow(probe!, "chill", 1.5, "°C");
    await claimAlert(alert.id, keeper);
    const due = await takeDueReminders(15 * MIN, new Date(alert.actNowAt!.getTime() + 20 * MIN));
    expect(due.map((a) => a.id)).not.toContain(alert.id);
  });
});
