import { MarkChip, type MarkName } from "./marks";

// A status is never shown by colour alone: each band has its own word, shape (components/ui/marks.tsx)
// and colour.
type Tone = "ok" | "cold" | "hot" | "dry" | "wet" | "ammonia" | "none";

const tones: Record<Tone, { cls: string; mark: MarkName }> = {
  ok: { cls: "bg-leaf-100 text-leaf-700 ring-leaf-500", mark: "comfortable" },
  hot: { cls: "bg-clay-100 text-clay-700 ring-clay-500", mark: "heat" },
  cold: { cls: "bg-frost-100 text-slate-700 ring-frost-500", mark: "cold" },
  dry: { cls: "bg-straw-100 text-straw-800 ring-straw-600", mark: "dry" },
  wet: { cls: "bg-slate-100 text-slate-700 ring-slate-500", mark: "wet" },
  ammonia: { cls: "bg-soil-100 text-soil-900 ring-soil-700", mark: "ammonia" },
  none: { cls: "bg-soil-100 text-soil-700 ring-soil-300", mark: "noReading" },
};

export function toneOfBand(band: string | null): Tone {
  if (!band) return "none";
  if (band === "comfortable") return "ok";
  if (band.includes("ammonia")) return "ammonia";
  if (band.includes("cold") || band === "cool") return "cold";
  if (band.includes("hot") || band === "warm") return "hot";
  if (band.includes("dry")) return "dry";
  if (band.includes("wet")) return "wet";
  return "none";
}

export function StatusMark({ band, label }: { band: string | null; label?: string }) {
  const tone = tones[toneOfBand(band)];
  return (
    <MarkChip name={tone.mark} cls={tone.cls} strong={band?.startsWith("too ")}>
      {label ?? band ?? "no reading"}
    </MarkChip>
  );
}
