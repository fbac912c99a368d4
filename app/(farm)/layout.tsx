import Link from "next/link";
import { redirect } from "next/navigation";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { FarmSwitcher } from "@/components/farm/farm-switcher";
import { isVerified } from "@/lib/server/auth/sign-up";
import { LAST_FARM_COOKIE } from "@/lib/server/farms/landing-farm";
import { listFarmsOf } from "@/lib/server/farms/list-farms";
import { currentUserId } from "@/lib/web/session";

export default async function FarmShell({ children }: { children: React.ReactNode }) {
  // A token past the proxy whose person is gone or whose password was reset reads as signed out.
  const userId = await currentUserId();
  if (!userId) redirect("/sign-in");
  // An address not confirmed yet reaches nothing but "check your mail".
  if (!(await isVerified(userId))) redirect("/check-mail");
  const farms = await listFarmsOf(userId);
  return (
    <div className="mx-auto min-h-dvh max-w-3xl">
      <header className="sticky top-0 z-10 flex items-center justify-between gap-1 bg-soil-800 px-4 py-2 text-soil-100 dark:bg-soil-100 dark:text-soil-900 dark:ring-1 dark:ring-soil-300">
        <div className="flex min-w-0 items-center gap-1">
          <Link href="/" className="flex min-h-11 shrink-0 items-center gap-2 font-bold">
            <img src="/icon.svg" alt="" width={28} height={28} /> <span className="sr-only sm:not-sr-only">Wormward</span>
          </Link>
          {farms.length > 0 && <FarmSwitcher farms={farms.map(({ id, name, role }) => ({ id, name, role }))} cookie={LAST_FARM_COOKIE} />}
        </div>
        <nav aria-label="Main" className="flex shrink-0 items-center text-sm whitespace-nowrap">
          <Link href="/" className="flex min-h-11 items-center rounded-lg px-2 hover:underline">
            Today
          </Link>
          <Link href="/me" className="flex min-h-11 items-center rounded-lg px-2 hover:underline">
            You
          </Link>
          <SignOutButton />
        </nav>
      </header>
      {children}
    </div>
  );
}
