import type { Metadata } from "next";
import { SWRConfig } from "swr";
import { AddBinForm } from "@/components/bins/lazy-forms";
import { SetupChecklist } from "@/components/setup/setup-checklist";
import { TodayBoard } from "@/components/today/today-board";
import { requirePageMember } from "@/lib/web/session";
import { readFarm } from "@/lib/server/farms/read-farm";
import { readToday } from "@/lib/server/farms/read-today";
import { readSetupChecklist } from "@/lib/server/farms/setup-checklist";
import { toWire } from "@/lib/domain/wire";
import { todayKey } from "@/lib/client/swr-keys";

export const metadata: Metadata = { title: "Today" };

export default async function TodayPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const [{ farm, role }, today, setup] = await Promise.all([readFarm(who), readToday(who), readSetupChecklist(who)]);
  return (
    <main>
      <div className="px-4 pt-4">
        <p className="text-sm text-soil-500">{farm.name}</p>
        <h1 className="text-3xl font-bold">Today</h1>
      </div>
      {/* Primed with the API's answer, dates as ISO strings, so the phone paints values at once. */}
      <SWRConfig value={{ fallback: { [todayKey(farmId)!]: toWire(today) } }}>
        {setup && (
          <div className="px-3 pt-3">
            <SetupChecklist farmId={farmId} checklist={setup} />
          </div>
        )}
        <TodayBoard farmId={farmId} units={farm.unitSystem} canLog={role !== "viewer"} />
        {role === "owner" && (
          <div className="px-3 pb-6">
            <AddBinForm farmId={farmId} system={farm.unitSystem} />
          </div>
        )}
      </SWRConfig>
    </main>
  );
}
