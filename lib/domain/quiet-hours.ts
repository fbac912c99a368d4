import { localClock } from "@/lib/domain/clock";

// Quiet hours are a local-time span "HH:MM"–"HH:MM" that may cross midnight; the end is exclusive.

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
    t = localClock(now, timezone).minutes;
  } catch {
    t = localClock(now, "UTC").minutes;
  }
  return from < to ? t >= from && t < to : t >= from || t < to;
}
