import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SWRConfig } from "swr";
import { ProbeCalibration } from "@/components/probes/probe-calibration";
import { ProbeHealthPanel } from "@/components/probes/probe-health";
import { probeHealthKey } from "@/lib/client/swr-keys";
import { toWire } from "@/lib/domain/wire";
import { requirePageMember } from "@/lib/web/session";
import { probeHealth } from "@/lib/server/probes/probe-health";
import { probeView } from "@/lib/server/probes/probe-view";

export const metadata: Metadata = { title: "Probe" };

export default async function ProbePage({ params }: { params: Promise<{ farmId: string; probeId: string }> }) {
  const { farmId, probeId } = await params;
  const id = Number(probeId);
  const who = await requirePageMember({ farmId, probeId: id }, "read");
  const probe = await probeView(id);
  if (!probe) notFound();
  const health = await probeHealth(who, id);
  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}/probes`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> Probes
        </Link>
        <h1 className="text-3xl font-bold">{probe.label ?? probe.code}</h1>
        <p className="text-sm text-soil-700">Whether it reports, what it sent that was refused, and the calibration of its moisture reading.</p>
      </div>
      <SWRConfig value={{ fallback: { [probeHealthKey(id)!]: toWire(health) } }}>
        <ProbeHealthPanel probeId={id} system={who.units} />
      </SWRConfig>
      <ProbeCalibration probeId={id} placed={!!probe.binId} canLog={who.role !== "viewer"} canFit={who.role === "owner"} system={who.units} />
    </main>
  );
}
