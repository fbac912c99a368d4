import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SWRConfig } from "swr";
import { getFarm } from "@/db/queries/farms";
import { getToday } from "@/db/queries/today";
import { AddBinForm } from "@/components/bins/add-bin-form";
import { TodayBoard } from "@/components/today/today-board";
import { requirePageMember } from "@/lib/web/session";
import { todayKey } from "@/lib/client/swr-keys";

export const metadata: Metadata = { title: "Today" };

export default async function TodayPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const { role } = await requirePageMember({ farmId }, "read");
  const farm = await getFarm(farmId);
  if (!farm) notFound();
  // Prime SWR with the server's answer so the phone paints values at once.
  const today = JSON.parse(JSON.stringify(await getToday(farmId)));
  return (
    <main>
      <div className="px-4 pt-4">
        <p className="text-sm text-soil-500">{farm.name}</p>
        <h1 className="text-3xl font-bold">Today</h1>
      </div>
      <SWRConfig value={{ fallback: { [todayKey(farmId)!]: today } }}>
        <TodayBoard farmId={farmId} units={farm.unitSystem} canLog={role !== "viewer"} />
        {role === "owner" && (
          <div className="px-3 pb-6">
            <AddBinForm farmId={farmId} />
          </div>
        )}
      </SWRConfig>
    </main>
  );
}
