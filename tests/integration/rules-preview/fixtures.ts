import type pg from "pg";

const MINUTE = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;

/** A probe's 30-day temperature history: 20 °C with hot spells, each ramping up over an hour,
 * holding `peak` for `holdH` hours, and ramping back down over an hour. Times in epoch ms. */
export type Spell = { dayAgo: number; peak: number; holdH: number };

export function heatHistory(now: number, spells: readonly Spell[], stepMin = 5, days = 31) {
  const points: { t: number; v: number }[] = [];
  const start = Math.floor((now - days * DAY) / (stepMin * MINUTE)) * stepMin * MINUTE;
  for (let t = start; t <= now; t += stepMin * MINUTE) {
    let v = 20 + 0.05 * Math.sin(t / (37 * MINUTE)); // a steady bed, a little noise
    for (const s of spells) {
      const a = now - s.dayAgo * DAY; // the ramp starts here
      const rise = (t - a) / HOUR;
      const fall = (t - (a + (1 + s.holdH) * HOUR)) / HOUR;
      if (rise >= 0 && rise < 1) v = Math.max(v, 20 + (s.peak - 20) * rise);
      else if (rise >= 1 && fall < 0) v = Math.max(v, s.peak);
      else if (fall >= 0 && fall < 1) v = Math.max(v, s.peak - (s.peak - 20) * fall);
    }
    points.push({ t, v: Math.round(v * 100) / 100 });
  }
  return points;
}

/** A live temperature probe in the zone with these readings stored; returns its id. */
export async function probeWithReadings(db: pg.Client, farmId: string, zoneId: string, points: readonly { t: number; v: number }[], intervalS = 300) {
  const code = `preview-${Math.random().toString(36).slice(2, 10)}`;
  const id = (
    await db.query(
      `insert into probes (farm_id, zone_id, code, token_hash, metrics, report_interval_s, last_seen_at) values ($1, $2, $3, 'not-a-token', '{temperature}', $4, $5) returning id`,
      [farmId, zoneId, code, intervalS, new Date(points.at(-1)!.t)],
    )
  ).rows[0].id as number;
  await db.query(
    `insert into readings (probe_id, metric, ts, value) select $1, 'temperature', to_timestamp(t / 1000.0), v from unnest($2::float8[], $3::float8[]) as x(t, v)`,
    [id, points.map((p) => p.t), points.map((p) => p.v)],
  );
  return id;
}

/** Two spells above the species' comfortable top (NC State Extension "Earthworms and Worm Bins":
 * ideal 15–25 °C, so heads-up above 25 °C) and three that stay at 24 °C, inside it. */
export const SPELLS: Spell[] = [
  { dayAgo: 27, peak: 27, holdH: 3 },
  { dayAgo: 21, peak: 24, holdH: 3 },
  { dayAgo: 15, peak: 24, holdH: 3 },
  { dayAgo: 9, peak: 27, holdH: 3 },
  { dayAgo: 4, peak: 24, holdH: 3 },
];
