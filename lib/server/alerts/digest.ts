// The daily digest: one farm's previous day per bin — alerts raised and settled, each zone's
// temperature and moisture range from the hourly rollups, feedings logged — as text and simple HTML.
import { getDigestData, type DigestData } from "@/db/queries/digest";
import { getFarm } from "@/db/queries/farms";
import type { Farm } from "@/db/schema";
import { escapeHtml } from "@/lib/server/mail/app-mailer";
import { env } from "@/lib/server/env";
import { formatNumber, formatMass, temperatureForDisplay, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import { localClock, zonedToUtc } from "@/lib/domain/clock";
import { KIND_WORDS, LEVEL_WORDS, cautionFor } from "../../domain/alert-words";
import { zoneName } from "@/lib/domain/zone-words";
import { CASTINGS_NOT_FOOD, LOCAL_CODES, WASH_HANDS } from "@/lib/domain/safety-words";
import { feedingInterval, nextFeeding } from "@/lib/domain/bin-cycle";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

export { localClock };

const wallMidnight = (date: string) => {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return Date.UTC(y, m - 1, d);
};

export function addDays(date: string, days: number): string {
  return new Date(wallMidnight(date) + days * 86_400_000).toISOString().slice(0, 10);
}

/** [start, end) of a farm-local day as instants; 23 or 25 hours long on a daylight-saving change. */
export function dayBounds(date: string, timeZone: string): { from: Date; to: Date } {
  return { from: new Date(zonedToUtc(wallMidnight(date), timeZone)), to: new Date(zonedToUtc(wallMidnight(addDays(date, 1)), timeZone)) };
}

function range(min: number, max: number, unit: string, digits: number) {
  const a = formatNumber(min, digits);
  const b = formatNumber(max, digits);
  return a === b ? `${a} ${unit}` : `${a}–${b} ${unit}`;
}

type BinSummary = { name: string; lines: string[] };

/** Each bin's lines; `readOn` is the farm-local day the digest is read (the day after the one it
 * tells), from which the next feeding is counted. */
export function summarize(data: DigestData, units: UnitSystem, readOn: { today: string; timeZone: string }): BinSummary[] {
  return data.bins.map((bin) => {
    const lines: string[] = [];
    const counts = data.alerts.filter((a) => a.binId === bin.id);
    const raised = counts.reduce((n, a) => n + a.raised, 0);
    const settled = counts.reduce((n, a) => n + a.settled, 0);
    const kinds = counts
      .filter((a) => a.raised > 0)
      .sort((a, b) => (a.level === b.level ? a.kind.localeCompare(b.kind) : a.level === "act_now" ? -1 : 1))
      .map(
        (a) => `${a.raised} ${LEVEL_WORDS[a.level as keyof typeof LEVEL_WORDS].toLowerCase()} ${KIND_WORDS[a.kind as keyof typeof KIND_WORDS].toLowerCase()}`,
      );
    lines.push(raised || settled ? `Alerts: ${raised} raised${kinds.length ? ` (${kinds.join(", ")})` : ""}, ${settled} settled` : "Alerts: none");
    // A heat or ammonia alert carries its caution here as in its push and e-mail, each said once.
    const cautions = new Set(counts.filter((a) => a.raised > 0).map((a) => cautionFor(a.kind as keyof typeof KIND_WORDS)));
    for (const c of cautions) if (c) lines.push(c);
    for (const z of data.zones.filter((z) => z.binId === bin.id)) {
      const label = zoneName(z);
      const t = data.ranges.find((r) => r.zoneId === z.id && r.metric === "temperature");
      const m = data.ranges.find((r) => r.zoneId === z.id && r.metric === "moisture");
      const parts = [
        t ? `temperature ${range(temperatureForDisplay(t.min, units), temperatureForDisplay(t.max, units), UNIT_LABELS[units].temperature, 1)}` : null,
        m ? `moisture ${range(m.min, m.max, "%", 0)}` : null,
      ].filter(Boolean);
      lines.push(`${label}: ${parts.length ? parts.join(", ") : "no readings"}`);
    }
    const f = data.feedings.find((x) => x.binId === bin.id);
    lines.push(f ? `Feedings: ${f.count} logged${f.totalKg ? `, ${formatMass(f.totalKg, units)} in all` : ""}` : "Feedings: none logged");
    const due = nextFeeding({
      lastFeedingAt: data.lastFeedings.find((x) => x.binId === bin.id)?.at ?? null,
      intervalDays: feedingInterval(bin.feedingIntervalDays, data.farmFeedingIntervalDays).days,
      ...readOn,
    });
    lines.push(due.words);
    return { name: bin.name, lines };
  });
}

export function renderDigest(p: { farm: Pick<Farm, "id" | "name" | "unitSystem" | "timezone">; date: string; data: DigestData; appUrl: string }) {
  // Put together by hand: ICU versions differ on the comma after the weekday.
  const d = new Date(wallMidnight(p.date));
  const word = (o: Intl.DateTimeFormatOptions) => d.toLocaleDateString("en-GB", { timeZone: "UTC", ...o });
  const dayWords = `${word({ weekday: "long" })} ${d.getUTCDate()} ${word({ month: "long" })} ${d.getUTCFullYear()}`;
  const subject = `[Wormward] ${p.farm.name}: your day, ${dayWords}`;
  const bins = summarize(p.data, p.farm.unitSystem, { today: addDays(p.date, 1), timeZone: timeZoneOrUtc(p.farm.timezone) });
  const link = `${p.appUrl}/farms/${p.farm.id}`;
  const footer = `${CASTINGS_NOT_FOOD} ${WASH_HANDS} ${LOCAL_CODES}`;
  const text = [
    `${p.farm.name} — ${dayWords} (${p.farm.timezone})`,
    "",
    ...(bins.length ? bins.flatMap((b) => [b.name, ...b.lines.map((l) => `  ${l}`), ""]) : ["No bins yet.", ""]),
    `Open Today: ${link}`,
    "",
    footer,
    "",
  ].join("\n");
  const html = `<h1 style="font-size:1.2em">${escapeHtml(p.farm.name)} — ${escapeHtml(dayWords)}</h1>
${bins.map((b) => `<h2 style="font-size:1.05em;margin-bottom:.2em">${escapeHtml(b.name)}</h2><ul style="margin-top:0">${b.lines.map((l) => `<li>${escapeHtml(l)}</li>`).join("")}</ul>`).join("\n")}
<p><a href="${escapeHtml(link)}">Open Today</a></p><p style="color:#57402f;font-size:.9em">${escapeHtml(footer)}</p>`;
  return { subject, text, html };
}

/** The digest of one farm for one farm-local day ("YYYY-MM-DD"), or null for an unknown farm. */
export async function buildDigest(farmId: string, date: string) {
  const farm = await getFarm(farmId);
  if (!farm) return null;
  const { from, to } = dayBounds(date, farm.timezone);
  const data = await getDigestData(farm.id, from, to);
  return { ...renderDigest({ farm, date, data, appUrl: env().APP_URL }), binCount: data.bins.length };
}
