// The alert history pages by (raise time, id): alerts raised at one instant, or within one
// millisecond (the database keeps microseconds, a Date does not), are each shown exactly once.
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { alerts, bins, farms, zones } from "@/db/schema";
import { alertHistoryPage } from "@/lib/server/alerts/list-alerts";
import { alertHistoryQuery } from "@/lib/domain/validation/alerts";

let farmId: string;
const made: string[] = [];

beforeAll(async () => {
  const d = db();
  const [farm] = await d.insert(farms).values({ name: "Paging farm" }).returning();
  farmId = farm!.id;
  const [bin] = await d.insert(bins).values({ farmId, name: "Paged bed", style: "bed", species: "eisenia-fetida" }).returning();
  const [zone] = await d.insert(zones).values({ binId: bin!.id, position: 1, kind: "working" }).returning();
  // Four at one instant, three more within the same millisecond, one a second earlier.
  const times = [
    ...Array(4).fill("2026-03-01 10:00:00.123456+00"),
    "2026-03-01 10:00:00.123001+00",
    "2026-03-01 10:00:00.123999+00",
    "2026-03-01 10:00:00.123500+00",
    "2026-03-01 09:59:59.123456+00",
  ];
  for (const [i, t] of times.entries()) {
    const [a] = await d
      .insert(alerts)
      .values({
        farmId,
        binId: bin!.id,
        zoneId: zone!.id,
        kind: "drying",
        level: "heads_up",
        state: "settled",
        subject: `zone:${zone!.id}:drying:${i}`,
        message: `Drying ${i}`,
        raisedAt: sql`${t}::timestamptz` as unknown as Date,
      })
      .returning({ id: alerts.id });
    made.push(a!.id);
  }
});
afterAll(async () => {
  await db().execute(sql`delete from farms where id = ${farmId}`);
});

describe("alert history paging", () => {
  it("pages of two walk every alert once, newest first, through ties at one instant", async () => {
    const seen: string[] = [];
    let cursor: { before: string; beforeId: string } | null = null;
    for (let page = 0; page < 10; page++) {
      const query = alertHistoryQuery.parse(cursor ?? {});
      const r = await alertHistoryPage({ farmId }, query, 2);
      seen.push(...r.alerts.map((a) => a.alert.id));
      cursor = r.older;
      if (!cursor) break;
    }
    expect(seen).toHaveLength(made.length);
    expect(new Set(seen)).toEqual(new Set(made));
    // Newest first: the earliest alert (a second before the rest) comes last.
    expect(seen.at(-1)).toBe(made.at(-1));
  });

  it("an old link with only a time still pages by time", async () => {
    const r = await alertHistoryPage({ farmId }, alertHistoryQuery.parse({ before: "2026-03-01T10:00:00Z" }), 10);
    expect(r.alerts.map((a) => a.alert.id)).toEqual([made.at(-1)]);
  });

  it("a cursor id that is not an alert id is refused in words", () => {
    const r = alertHistoryQuery.safeParse({ before: "2026-03-01T10:00:00Z", beforeId: "x" });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.message).toMatch(/alert's id/);
  });
});
