import Link from "next/link";
import { redirect } from "next/navigation";
import { getUser } from "@/db/queries/users";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { currentUserId } from "@/lib/web/session";

export default async function FarmShell({ children }: { children: React.ReactNode }) {
  const userId = await currentUserId();
  const user = userId ? await getUser(userId) : null;
  if (!user) redirect("/sign-in");
  return (
    <div className="mx-auto min-h-dvh max-w-3xl">
      <header className="sticky top-0 z-10 flex items-center justify-between bg-soil-800 px-4 py-2 text-soil-100">
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
