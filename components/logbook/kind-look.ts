import type { MarkName } from "@/components/ui/marks";
import type { LogKind } from "@/lib/domain/vocabulary";

// Each kind has its own word and its own mark (components/ui/marks.tsx), so a list never leans on colour alone.
export const LOG_KIND_LOOK: Record<LogKind, { word: string; plural: string; mark: MarkName; cls: string }> = {
  feeding: { word: "Feeding", plural: "Feedings", cls: "bg-leaf-100 text-leaf-700", mark: "feeding" },
  watering: { word: "Water", plural: "Water", cls: "bg-slate-100 text-slate-700", mark: "watering" },
  shift: { word: "Shift", plural: "Shifts", cls: "bg-paper text-leaf-700 ring-1 ring-leaf-500", mark: "shift" },
  harvest: { word: "Harvest", plural: "Harvests", cls: "bg-soil-100 text-soil-800", mark: "harvest" },
  note: { word: "Note", plural: "Notes", cls: "bg-straw-100 text-straw-800", mark: "note" },
  sample: { word: "Oven-dry sample", plural: "Oven-dry samples", cls: "bg-paper text-soil-800 ring-1 ring-soil-300", mark: "ovenSample" },
};
