// The kinds of entry the bin page's "Log" button offers, in the order it lists them. Data, not
// markup: a new kind is one entry here (its key is the ?log= value in the address).
import type { ReactNode } from "react";
import { FeedingForm } from "@/components/logbook/feeding-form";
import { HarvestForm } from "@/components/logbook/harvest-form";
import { NoteForm } from "@/components/logbook/note-form";
import { SampleForm, type BinProbe } from "@/components/logbook/sample-form";
import { ShiftForm } from "@/components/logbook/shift-form";
import { WaterForm } from "@/components/logbook/water-form";
import type { MarkName } from "@/components/ui/mark-shapes";
import type { ZoneChoice } from "@/lib/client/wire";
import type { BinForLoad } from "@/lib/domain/feeding-load";
import type { UnitSystem } from "@/lib/domain/units";

export type LogFormProps = {
  farmId: string;
  binId: string;
  zones: ZoneChoice[];
  system: UnitSystem;
  probes: BinProbe[];
  defaultZoneId: string | null;
  /** The bin has a harvest side (flow-through or windrow with a curing zone). */
  harvestSide: boolean;
  /** The bin's floor and feeding interval, to weigh a feeding against before it is logged. */
  feedingBin?: BinForLoad;
};

export type LogFormKind = {
  key: string;
  label: string;
  hint: string;
  mark: MarkName;
  /** Offered only where this holds (every bin when absent). */
  shows?: (p: LogFormProps) => boolean;
  render: (p: LogFormProps) => ReactNode;
};

export const LOG_FORM_KINDS: readonly LogFormKind[] = [
  {
    key: "feeding",
    label: "Feeding",
    hint: "Food and bedding, with the mix check",
    mark: "feeding",
    render: (p) => <FeedingForm farmId={p.farmId} binId={p.binId} zones={p.zones} defaultZoneId={p.defaultZoneId} system={p.system} bin={p.feedingBin} />,
  },
  {
    key: "water",
    label: "Water",
    hint: "Water added to the bed",
    mark: "watering",
    render: (p) => <WaterForm binId={p.binId} zones={p.zones} system={p.system} />,
  },
  {
    key: "shift",
    label: "Shift",
    hint: "Material moved toward the harvest side",
    mark: "shift",
    shows: (p) => p.harvestSide,
    render: (p) => <ShiftForm binId={p.binId} zones={p.zones} system={p.system} />,
  },
  {
    key: "harvest",
    label: "Harvest",
    hint: "Castings taken out",
    mark: "harvest",
    render: (p) => <HarvestForm binId={p.binId} zones={p.zones} system={p.system} />,
  },
  {
    key: "sample",
    label: "Oven-dry sample",
    hint: "Weighed before and after drying, beside a probe",
    mark: "ovenSample",
    render: (p) => <SampleForm farmId={p.farmId} binId={p.binId} zones={p.zones} probes={p.probes} system={p.system} />,
  },
  { key: "note", label: "Note", hint: "Anything worth remembering", mark: "note", render: (p) => <NoteForm binId={p.binId} zones={p.zones} /> },
];

/** The kinds this bin offers, and the one the address asks for (?log=…; a ?zone= alone, as the zone
 * page links, asks for a feeding there). */
export function logKindsFor(p: LogFormProps, asked: { log?: string; zone?: string }) {
  const offered = LOG_FORM_KINDS.filter((k) => !k.shows || k.shows(p));
  const key = asked.log ?? (asked.zone ? "feeding" : undefined);
  return { offered, open: offered.find((k) => k.key === key) ?? null };
}
