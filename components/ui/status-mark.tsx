// A status is never shown by colour alone: each band has its own word, shape and colour.
type Tone = "ok" | "cold" | "hot" | "dry" | "wet" | "none";

const tones: Record<Tone, { cls: string; shape: React.ReactNode }> = {
  ok: { cls: "bg-leaf-100 text-leaf-700 ring-leaf-500", shape: <circle cx="6" cy="6" r="5" /> },
  hot: { cls: "bg-clay-100 text-clay-700 ring-clay-500", shape: <path d="M6 0.5 11.5 11H0.5Z" /> },
  cold: { cls: "bg-frost-100 text-slate-700 ring-frost-500", shape: <path d="M6 11.5 11.5 1H0.5Z" /> },
  dry: { cls: "bg-straw-100 text-straw-800 ring-straw-600", shape: <path d="M6 0.5 11.5 6 6 11.5 0.5 6Z" /> },
  wet: { cls: "bg-slate-100 text-slate-700 ring-slate-500", shape: <path d="M6 0.5C8 4 10.5 6 10.5 8a4.5 4.5 0 0 1-9 0C1.5 6 4 4 6 0.5Z" /> },
  none: { cls: "bg-soil-100 text-soil-700 ring-soil-300", shape: <path d="M1 5h10v2H1z" /> },
};

export function toneOfBand(band: string | null): Tone {
  if (!band) return "none";
  if (band === "comfortable") return "ok";
  if (band.includes("cold") || band === "cool") return "cold";
  if (band.includes("hot") || band === "warm") return "hot";
  if (band.includes("dry")) return "dry";
  if (band.includes("wet")) return "wet";
  return "none";
}

export function StatusMark({ band, label }: { band: string | null; label?: string }) {
  const tone = tones[toneOfBand(band)];
  const severe = band?.startsWith("too ");
  return (
    <span className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-sm ring-1 ${tone.cls} ${severe ? "font-bold ring-2" : ""}`}>
      <svg viewBox="0 0 12 12" width="12" height="12" aria-hidden="true" fill="currentColor">
        {tone.shape}
      </svg>
      {label ?? band ?? "no reading"}
    </span>
  );
}
