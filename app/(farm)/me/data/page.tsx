import type { Metadata } from "next";
import { ConfirmDeleteForm } from "@/components/farm/farm-exit-forms";
import { DELETE_ACCOUNT_WORDS } from "@/lib/domain/validation/sign-up";
import { deleteAccountAction } from "./actions";

export const metadata: Metadata = { title: "Your data" };

export default function MyDataPage() {
  return (
    <main className="space-y-4 p-5">
      <h1 className="text-2xl font-bold">Your data</h1>
      <section className="space-y-2 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 className="text-xl font-bold">Download</h2>
        <p className="text-soil-700">
          One JSON file: your account, the farms you are on, and everything of the farms you own (bins, probes, hourly readings, alerts, logbook), with a
          download link for each zone’s raw readings, month by month.
        </p>
        <a href="/api/me/data" download className="flex min-h-12 items-center justify-center rounded-xl bg-soil-800 font-bold text-white">
          Download my data
        </a>
      </section>
      <section className="space-y-2 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 className="text-xl font-bold">Delete my account</h2>
        <p className="text-soil-700">
          Farms where you are the only member are deleted with you. If you are the last owner of a farm others are on, make one of them an owner first.
        </p>
        <ConfirmDeleteForm label={`Type "${DELETE_ACCOUNT_WORDS}"`} hint="This cannot be undone." button="Delete my account" action={deleteAccountAction} />
      </section>
    </main>
  );
}
