import type { Metadata } from "next";
import { listBins } from "@/db/queries/bins";
import { ProbeList } from "@/components/probes/probe-list";
import { requirePageMember } from "@/lib/web/session";

export const metadata: Metadata = { title: "Probes" };

export default async function ProbesPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const bins = await listBins(farmId);
  const zones = bins.flatMap((b) => b.zones.map((z) => ({ id: z.id, label: `${b.name} · ${z.name ?? `${z.kind} zone`}` })));
  return (
    <main>
      <h1 className="px-4 pt-4 text-3xl font-bold">Probes</h1>
      <ProbeList farmId={farmId} zones={zones} canManage={who.role === "owner"} />
    </main>
  );
}
