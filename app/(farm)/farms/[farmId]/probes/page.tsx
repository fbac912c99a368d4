import type { Metadata } from "next";
import { ProbeList } from "@/components/probes/probe-list";
import { requirePageMember } from "@/lib/web/session";
import { publicAddresses } from "@/lib/server/probes/public-addresses";
import { zoneChoices } from "@/lib/server/probes/zone-choices";

export const metadata: Metadata = { title: "Probes" };

export default async function ProbesPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const zones = await zoneChoices(who);
  const canManage = who.role === "owner";
  return (
    <main>
      <h1 className="px-4 pt-4 text-3xl font-bold">Probes</h1>
      <ProbeList farmId={farmId} zones={zones} canManage={canManage} addresses={canManage ? publicAddresses() : null} />
    </main>
  );
}
