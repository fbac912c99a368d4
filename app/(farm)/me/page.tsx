import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { QuietHoursForm } from "@/components/me/quiet-hours-form";
import { AlertsOnThisPhone } from "@/components/push/alerts-on-this-phone";
import { currentUserId } from "@/lib/web/session";
import { readMe } from "@/lib/server/people/read-me";
import { saveQuietHours } from "./actions";
import { ROLE_WORDS } from "@/lib/domain/team-words";

export const metadata: Metadata = { title: "You" };

export default async function MePage() {
  const userId = await currentUserId();
  if (!userId) redirect("/sign-in");
  const user = await readMe(userId);
  const crew = user.farms.some((f) => f.role !== "viewer");
  return (
    <main className="space-y-4 p-3">
      <div className="px-1 pt-1">
        <h1 className="text-3xl font-bold">{user.name}</h1>
        <p className="text-soil-700">{user.email}</p>
        <ul className="mt-1 text-sm text-soil-700">
          {user.farms.map((f) => (
            <li key={f.id}>
              {f.name}: {ROLE_WORDS[f.role].name}, {ROLE_WORDS[f.role].does}
            </li>
          ))}
        </ul>
      </div>
      {crew ? (
        <>
          <AlertsOnThisPhone />
          <QuietHoursForm action={saveQuietHours} quietFrom={user.quietFrom} quietTo={user.quietTo} timezone={user.timezone} />
        </>
      ) : (
        <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">Alerts go to keepers and owners. As a viewer you can read every chart and the logbook.</p>
      )}
    </main>
  );
}
