import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { StartFarmForm } from "@/components/farm/start-farm-form";
import { currentUserId } from "@/lib/web/session";
import { LAST_FARM_COOKIE, landingFarm } from "@/lib/server/farms/landing-farm";
import { startFarmAction } from "./farms/new/actions";

// Home goes to Today of the farm the person had open last (the header's switcher remembers it).
export default async function Home() {
  const userId = await currentUserId();
  if (!userId) redirect("/sign-in");
  const farm = await landingFarm(userId, (await cookies()).get(LAST_FARM_COOKIE)?.value);
  if (farm) redirect(`/farms/${farm.id}`);
  return (
    <main className="space-y-4 p-5">
      <h1 className="text-2xl font-bold">No farm yet</h1>
      <p className="text-soil-700">Start a farm of your own here. To join someone else&apos;s, open the link in the invitation they sent you.</p>
      <StartFarmForm action={startFarmAction} />
    </main>
  );
}
