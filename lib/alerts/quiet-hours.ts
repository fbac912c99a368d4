// Quiet hours are a local-time span "HH:MM"–"HH:MM" that may cross midnight; the end is exclusive.
export function localMinutes(now: Date, timezone: string): number {
  const parts = new Intl.DateTimeFormat("en-GB", { timeZone: timezone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).formatToParts(now);
  const h = Number(parts.find((p) => p.type === "hour")?.value ?? 0);
  const m = Number(parts.find((p) => p.type === "minute")?.value ?? 0);
  return h * 60 + m;
}

const toMinutes = (hhmm: string) => {
  const [h, m] = hhmm.split(":").map(Number);
  return (h ?? 0) * 60 + (m ?? 0);
};

export function inQuietHours(now: Date, quietFrom: string | null, quietTo: string | null, timezone: string): boolean {
  if (!quietFrom || !quietTo) return false;
  const from = toMinutes(quietFrom);
  const to = toMinutes(quietTo);
  if (from === to) return false;
  let t: number;
  try {
    t = localMinutes(now, timezone);
  } catch {
    t = localMinutes(now, "UTC");
  }
  return from < to ? t >= from && t < to : t >= from || t < to;
}
