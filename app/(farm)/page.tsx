import { redirect } from "next/navigation";
import { currentUserId } from "@/lib/web/session";
import { listFarmsOf } from "@/lib/server/farms/list-farms";

// Home goes to Today of the person's first farm.
export default async function Home() {
  const userId = await currentUserId();
  if (!userId) redirect("/sign-in");
  const [first] = await listFarmsOf(userId);
  if (first) redirect(`/farms/${first.id}`);
  return (
    <main className="p-5">
      <h1 className="text-2xl font-bold">No farm yet</h1>
      <p className="mt-2 text-soil-700">You are not on any farm&apos;s team. Ask an owner to invite you, or start a farm of your own.</p>
    </main>
  );
}
