import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { BadRows, ImportForm } from "@/components/imports/import-form";
import { requirePageMember } from "@/lib/web/session";
import { importsView } from "@/lib/server/imports/imports-view";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

export const metadata: Metadata = { title: "Import logger files" };

export default async function ImportsPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const view = await importsView(who);
  if (!view) notFound();
  const { farm, history, probes } = view;
  return (
    <main className="space-y-6 p-4">
      <div>
        <a href={`/farms/${farmId}`} className="inline-flex min-h-11 items-center text-sm text-soil-500">
          ← Today
        </a>
        <h1 className="text-3xl font-bold">Import logger files</h1>
        <p className="mt-1 text-soil-700">
          Readings from a logger that was not online: upload its CSV, say which column is which, and the good rows are stored. Rows already stored are skipped,
          so importing a file twice adds nothing.
        </p>
      </div>
      {who.role === "owner" ? (
        <ImportForm farmId={farmId} probes={probes} timezone={timeZoneOrUtc(farm.timezone)} />
      ) : (
        <p className="rounded-xl bg-soil-100 p-4">Only an owner of {farm.name} can import files. You can read the history below.</p>
      )}
      <section>
        <h2 className="mb-2 text-xl font-bold">Earlier imports</h2>
        {history.length === 0 && <p className="text-soil-500">None yet.</p>}
        <ul className="space-y-3">
          {history.map((i) => (
            <li key={i.id} className="rounded-xl bg-white p-3 ring-1 ring-soil-300">
              <p className="font-bold break-all">{i.fileName}</p>
              <p className="tabular text-sm text-soil-700">
                {i.createdAt.toLocaleString("en-GB", { timeZone: timeZoneOrUtc(farm.timezone), dateStyle: "medium", timeStyle: "short" })} · {i.rowsStored}{" "}
                stored · {i.rowsRejected} refused · {i.rowsTotal} rows in the file
              </p>
              {i.report.length > 0 && <BadRows report={i.report} truncated={i.rowsRejected > i.report.length} total={i.rowsRejected} />}
            </li>
          ))}
        </ul>
      </section>
    </main>
  );
}
