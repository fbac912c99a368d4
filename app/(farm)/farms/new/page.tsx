import type { Metadata } from "next";
import { StartFarmForm } from "@/components/farm/start-farm-form";
import { startFarmAction } from "./actions";

export const metadata: Metadata = { title: "Start a farm" };

export default function NewFarmPage() {
  return (
    <main className="space-y-4 p-5">
      <h1 className="text-2xl font-bold">Start a farm</h1>
      <p className="text-soil-700">You become its owner: you add its bins and probes and invite the people who help.</p>
      <StartFarmForm action={startFarmAction} />
    </main>
  );
}
