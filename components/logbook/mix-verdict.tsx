import { MarkChip, type MarkName } from "@/components/ui/marks";
import type { MixVerdict } from "@/lib/domain/mix";

// Each verdict has its own mark: the mix check is a balance, level when the mix is right and tipped
// toward the side there is too much of (a round weight for nitrogen-rich greens, a square block for
// carbon-rich browns); too wet and too dry share the moisture bands' drop and clod.
const LOOK: Record<MixVerdict, { mark: MarkName; cls: string }> = {
  balanced: { mark: "mixBalanced", cls: "bg-leaf-100 text-leaf-700 ring-leaf-500" },
  "too rich in nitrogen": { mark: "mixNitrogen", cls: "bg-clay-100 text-clay-700 ring-clay-500" },
  "too rich in carbon": { mark: "mixCarbon", cls: "bg-soil-100 text-soil-800 ring-soil-500" },
  "too wet": { mark: "wet", cls: "bg-slate-100 text-slate-700 ring-slate-500" },
  "too dry": { mark: "dry", cls: "bg-straw-100 text-straw-800 ring-straw-600" },
};

export function MixVerdictMark({ verdict }: { verdict: MixVerdict | null }) {
  if (!verdict)
    return (
      <MarkChip name="noReading" cls="bg-soil-100 text-soil-700 ring-soil-300">
        no verdict
      </MarkChip>
    );
  const l = LOOK[verdict];
  return (
    <MarkChip name={l.mark} cls={l.cls} strong={verdict !== "balanced"}>
      {verdict}
    </MarkChip>
  );
}
