import Link from "next/link";
import { redirect } from "next/navigation";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { currentUserId } from "@/lib/web/session";

export default async function FarmShell({ children }: { children: React.ReactNode }) {
  // A token past the proxy whose person is gone or whose password was reset reads as signed out.
  if (!(await currentUserId())) redirect("/sign-in");
  return (
    <div className="mx-auto min-h-dvh max-w-3xl">
      <header className="sticky top-0 z-10 flex items-center justify-between bg-soil-800 px-4 py-2 text-soil-100 dark:bg-soil-100 dark:text-soil-900 dark:ring-1 dark:ring-soil-300">
        <Link href="/" className="flex min-h-11 items-center gap-2 font-bold">
          <img src="/icon.svg" alt="" width={28} height={28} /> Wormward
        </Link>
        <nav aria-label="Main" className="flex items-center gap-1 text-sm">
          <Link href="/" className="flex min-h-11 items-center rounded-lg px-3 hover:underline">
            Today
          </Link>
          <Link href="/me" className="flex min-h-11 items-center rounded-lg px-3 hover:underline">
            You
          </Link>
          <SignOutButton />
        </nav>
      </header>
      {children}
    </div>
  );
}
