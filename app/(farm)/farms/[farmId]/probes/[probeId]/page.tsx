import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { ProbeCalibration } from "@/components/probes/probe-calibration";
import { requirePageMember } from "@/lib/web/session";
import { probeView } from "@/lib/server/probes/probe-view";

export const metadata: Metadata = { title: "Probe calibration" };

export default async function ProbePage({ params }: { params: Promise<{ farmId: string; probeId: string }> }) {
  const { farmId, probeId } = await params;
  const id = Number(probeId);
  const { role, units } = await requirePageMember({ farmId, probeId: id }, "read");
  const probe = await probeView(id);
  if (!probe) notFound();
  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}/probes`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> Probes
        </Link>
        <h1 className="text-3xl font-bold">{probe.label ?? probe.code}</h1>
        <p className="text-sm text-soil-700">Oven-dry samples and the calibration of its moisture reading.</p>
      </div>
      <ProbeCalibration probeId={id} placed={!!probe.binId} canLog={role !== "viewer"} canFit={role === "owner"} system={units} />
    </main>
  );
}
