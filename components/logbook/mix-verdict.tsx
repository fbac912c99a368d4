import { StatusMark } from "@/components/ui/status-mark";
import type { MixVerdict } from "@/lib/domain/mix";

// Each verdict borrows a band's word-and-shape: nitrogen-rich mixes heat and give off ammonia (clay,
// triangle up), wet and dry match the moisture marks, carbon-rich is slow rather than harmful.
const BAND_OF: Record<MixVerdict, string | null> = {
  balanced: "comfortable",
  "too rich in nitrogen": "too hot",
  "too wet": "too wet",
  "too dry": "too dry",
  "too rich in carbon": null,
};

export function MixVerdictMark({ verdict }: { verdict: MixVerdict | null }) {
  if (!verdict) return <StatusMark band={null} label="no verdict" />;
  return <StatusMark band={BAND_OF[verdict]} label={verdict} />;
}
