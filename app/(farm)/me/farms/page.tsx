import type { Metadata } from "next";
import Link from "next/link";
import { ConfirmDeleteForm, LeaveFarmForm } from "@/components/farm/farm-exit-forms";
import { listFarmsOf } from "@/lib/server/farms/list-farms";
import { requireUser } from "@/lib/web/session";
import { deleteFarmAction, leaveFarmAction } from "./actions";

export const metadata: Metadata = { title: "Your farms" };

export default async function MyFarmsPage({ searchParams }: { searchParams: Promise<{ notice?: string }> }) {
  const farms = await listFarmsOf(await requireUser());
  const { notice } = await searchParams;
  return (
    <main className="space-y-4 p-5">
      <h1 className="text-2xl font-bold">Your farms</h1>
      {notice === "left" && (
        <p role="status" className="rounded-xl bg-leaf-100 p-3 font-bold text-leaf-700">
          You have left the farm.
        </p>
      )}
      {farms.length === 0 && <p className="text-soil-700">You are on no farm.</p>}
      {farms.map((f) => (
        <section key={f.id} aria-label={f.name} className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 className="text-xl font-bold">
            <Link href={`/farms/${f.id}`} className="underline">
              {f.name}
            </Link>{" "}
            <span className="text-base font-normal text-soil-700">you are {f.role === "owner" ? "an owner" : `a ${f.role}`}</span>
          </h2>
          <LeaveFarmForm farmId={f.id} action={leaveFarmAction} />
          {f.role === "owner" && (
            <details>
              <summary className="min-h-11 cursor-pointer font-bold text-clay-700">Delete this farm</summary>
              <p className="my-2 text-soil-700">
                Its bins, zones, probes, readings, alerts, logbook and team go with it, for everyone, and cannot be brought back.
              </p>
              <ConfirmDeleteForm
                label="Type the farm's name"
                hint={f.name}
                hidden={{ farmId: f.id }}
                button="Delete the farm and all of it"
                action={deleteFarmAction}
              />
            </details>
          )}
        </section>
      ))}
      <Link href="/farms/new" className="flex min-h-12 items-center justify-center rounded-xl bg-leaf-700 font-bold text-white">
        Start a farm
      </Link>
    </main>
  );
}
